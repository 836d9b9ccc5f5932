/** What a person sees on a page their role does not open: what happened and what to do next. */
export function Refusal({ what, who }: { what: string; who: string }) {
  return (
    <div role="alert" className="rounded-lg border border-danger bg-danger-soft p-5 max-w-xl">
      <h1 className="font-semibold text-danger">You may not open this page</h1>
      <p className="text-sm mt-1">{what} is for {who}. If you need it, ask an admin of your institute to change your role.</p>
    </div>
  );
}
