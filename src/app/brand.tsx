/** The Tarebook mark (same drawing as src/public/favicon.svg) and word mark. */
export function BrandMark({ className = 'size-9' }: { className?: string }) {
  return (
    <svg viewBox="0 0 64 64" aria-hidden="true" className={className}>
      <rect width="64" height="64" rx="14" fill="#1b2a36" />
      <rect x="27" y="13" width="10" height="9" rx="2" fill="#e0a526" />
      <rect x="25" y="10" width="14" height="4" rx="2" fill="#e0a526" />
      <path d="M10 26h44c0 9-9.8 15-22 15S10 35 10 26z" fill="#f5f2ea" />
      <rect x="30" y="41" width="4" height="9" fill="#f5f2ea" />
      <rect x="18" y="50" width="28" height="5" rx="2.5" fill="#f5f2ea" />
    </svg>
  );
}

export function Brand() {
  return (
    <span className="flex items-center gap-3">
      <BrandMark className="size-9 rounded-lg ring-1 ring-white/25" />
      <span className="text-xl font-bold tracking-tight">Tarebook</span>
    </span>
  );
}
