import { AreaPending } from "@/components/ui/area-pending";

export const metadata = { title: "Ensembles" };

export default function EnsemblesPage() {
  return <AreaPending title="Ensembles" purpose="Submit ensemble specs, watch their runs and resubmit what failed."
    next="Here you will submit an ensemble from a form, a spec file or the ergodex command line, and follow every run to done." />;
}
