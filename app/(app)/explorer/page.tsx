import { AreaPending } from "@/components/ui/area-pending";

export const metadata = { title: "Explorer" };

export default function ExplorerPage() {
  return <AreaPending title="Explorer" purpose="Filter, compare and plot estimates across the whole archive."
    next="Estimates with their errors and tau_int will be filterable by sampler, ensemble, tag and parameter ranges, and plottable against any parameter." />;
}
