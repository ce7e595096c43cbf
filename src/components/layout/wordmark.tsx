/** The Parallax wordmark: two marks (diamond, circle) seen either side of one line. */
export function Wordmark() {
  return (
    <span className="inline-flex items-center gap-2">
      <svg width="22" height="22" viewBox="0 0 22 22" aria-hidden="true">
        <path d="M6.5 5 11 11l-4.5 6L2 11Z" className="fill-hardware" />
        <circle cx="15.5" cy="11" r="4" fill="none" strokeWidth="2" className="stroke-classical" />
        <path d="M11 2v18" strokeWidth="1.5" className="stroke-ink" />
      </svg>
      <span className="text-lg font-semibold tracking-tight">Parallax</span>
    </span>
  );
}
