import { coreHours } from "@/lib/format";
import type { AllocationUsage } from "@/lib/allocations/usage";

const pct = (x: number) => `${(100 * x).toFixed(1)} %`;

/** Granted / charged / held / free and the burn figures, one tile each. */
export function BalanceTiles({ u }: { u: AllocationUsage }) {
  const { balance: b, burn } = u;
  const tiles: [string, string, string, string?][] = [
    ["given", coreHours(b.given), `granted ${coreHours(b.granted)}, adjusted ${coreHours(b.adjusted)}`],
    ["charged", coreHours(b.charged), `${pct(burn.chargedShare)} of given · ${pct(burn.elapsed)} of the period gone`],
    ["held", coreHours(b.held), "reserved by runs not yet settled"],
    ["free", coreHours(b.free), "what new submissions may reserve", b.free <= 0 ? "text-danger" : ""],
    ["burn rate", `${coreHours(burn.ratePerDay)} /day`, `last ${Math.floor(burn.windowDays)} days · even spending ${coreHours(burn.linePerDay)} /day`],
    ["runs out", burn.runOut ?? "—", burn.runOut ? (burn.runsOutEarly ? "at this rate, BEFORE the period ends" : "at this rate, after the period ends") : "no charges lately", burn.runsOutEarly ? "text-danger" : ""],
  ];
  return (
    <dl className="grid grid-cols-3 lg:grid-cols-6 gap-3" data-testid="balance-tiles">
      {tiles.map(([label, value, note, cls]) => (
        <div key={label} className="rounded-lg border border-line bg-paper-raised p-3">
          <dt className="text-xxs uppercase tracking-wide text-ink-soft">{label}</dt>
          <dd className={`num text-lg font-semibold ${cls ?? ""}`} data-testid={`tile-${label.replace(" ", "-")}`}>{value}</dd>
          <dd className="text-xxs text-ink-faint leading-tight">{note}</dd>
        </div>
      ))}
    </dl>
  );
}
