import { AreaPending } from "@/components/ui/area-pending";

export const metadata = { title: "Archive" };

export default function ArchivePage() {
  return <AreaPending title="Archive" purpose="Every imported result bundle, from the cluster or uploaded from elsewhere."
    next="Imports will be listed here with their hashes, and result bundles of runs done outside Ergodex can be uploaded." />;
}
