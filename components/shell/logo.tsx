/** Ergodex's mark: a chain of states settling on one (a nod to ergodicity). */
export function Logo() {
  return (
    <span className="flex items-center gap-2 font-semibold tracking-tight text-ink">
      <svg width="22" height="22" viewBox="0 0 22 22" aria-hidden>
        <circle cx="4" cy="15" r="2.2" fill="#7a838e" />
        <circle cx="10" cy="7" r="2.2" fill="#48515c" />
        <circle cx="17" cy="12" r="3.2" fill="#0f6b6b" />
        <path d="M4 15 L10 7 L17 12" stroke="#0f6b6b" strokeWidth="1.2" fill="none" />
      </svg>
      Ergodex
    </span>
  );
}
