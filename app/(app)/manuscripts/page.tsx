import { AreaPending } from "@/components/ui/area-pending";

export const metadata = { title: "Manuscripts" };

export default function ManuscriptsPage() {
  return <AreaPending title="Manuscripts" purpose="Freeze the data behind a paper's figures and audit where every number came from."
    next="PIs will group saved explorer views into a manuscript's exhibits, freeze them with hashes and verify them later." />;
}
