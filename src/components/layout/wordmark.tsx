/** The Parallax wordmark: two marks (diamond, circle) seen either side of one line. */
export function Wordmark() {
  return (
    <span className="inline-flex items-center gap-2">
      <svg width="30" height="22" viewBox="0 0 30 22" aria-hidden="true">
        <path d="M7 5.5 12 11l-5 5.5L2 11Z" className="fill-hardware" />
        <path d="M15 3v16" strokeWidth="1.5" className="stroke-ink" />
        <circle cx="22.5" cy="11" r="4.25" fill="none" strokeWidth="2" className="stroke-classical" />
      </svg>
      <span className="text-lg font-semibold tracking-tight">Parallax</span>
    </span>
  );
}
