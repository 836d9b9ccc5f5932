// Where exact counting of an explorer result stops (shared by the server and the table's "about N" note).

/** Exact counts up to here; an exact count of a huge result costs a scan of all of it (bench/explorer-scale.ts), a pager needs no more. */
export const COUNT_CAP = 2_000;
