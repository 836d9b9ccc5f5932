import { inputClass } from "@/components/ui/field";
import { Button } from "@/components/ui/button";

/** Search by recipient, sender or subject; a plain GET form, so the URL carries the query. */
export function MailSearch({ q }: { q: string }) {
  return (
    <form method="get" action="/mailbox" role="search" className="flex items-center gap-2 mb-3 max-w-lg">
      <input name="q" defaultValue={q} placeholder="recipient or subject" aria-label="Search recipient or subject" className={inputClass} />
      <Button type="submit" variant="quiet">Search</Button>
      {q ? <a href="/mailbox" className="text-sm text-accent underline whitespace-nowrap">Clear</a> : null}
    </form>
  );
}
