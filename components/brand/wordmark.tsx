/** Partita's mark: five bars of different mixes, like shards that do not quite agree. */
export function Mark({ className = "h-7 w-7" }: { className?: string }) {
  return (
    <svg viewBox="0 0 32 32" aria-hidden="true" className={className}>
      <rect x="2" y="6" width="4" height="20" rx="1" fill="#3d4a9e" />
      <rect x="8" y="10" width="4" height="16" rx="1" fill="#2f8f83" />
      <rect x="14" y="4" width="4" height="22" rx="1" fill="#d9652b" />
      <rect x="20" y="12" width="4" height="14" rx="1" fill="#2f8f83" />
      <rect x="26" y="8" width="4" height="18" rx="1" fill="#3d4a9e" />
      <rect x="1" y="27" width="30" height="2" rx="1" fill="#1c2230" />
    </svg>
  );
}

export function Wordmark() {
  return (
    <span className="inline-flex items-center gap-2 text-lg font-semibold tracking-tight text-ink">
      <Mark />
      Partita
    </span>
  );
}
