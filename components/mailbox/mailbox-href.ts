/** A Mailbox URL keeping the search and page, optionally opening one message. */
export function mailboxHref(state: { q?: string; page?: number; open?: string }): string {
  const p = new URLSearchParams();
  if (state.q) p.set("q", state.q);
  if (state.page && state.page > 1) p.set("page", String(state.page));
  if (state.open) p.set("open", state.open);
  const s = p.toString();
  return s ? `/mailbox?${s}` : "/mailbox";
}
