import { PageHeader } from "./page-header";

/** An area of the navigation that this build does not open yet; says so plainly. */
export function AreaPending({ title, purpose, next }: { title: string; purpose: string; next: string }) {
  return (
    <>
      <PageHeader title={title} purpose={purpose} />
      <div className="rounded-lg border border-dashed border-line-strong p-6 text-sm text-ink-soft max-w-2xl">
        <p className="font-medium text-ink">Not open in this build yet.</p>
        <p className="mt-1">{next}</p>
      </div>
    </>
  );
}
