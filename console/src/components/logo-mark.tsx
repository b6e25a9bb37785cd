/** Gridwright's mark: a 3×3 lattice of cells with a stepped trace climbing through it. */
export function LogoMark({ className = 'h-6 w-6' }: { className?: string }) {
  return (
    <svg viewBox="0 0 24 24" className={className} aria-hidden="true">
      <rect x="1" y="1" width="22" height="22" rx="5" className="fill-ash-900" />
      {[0, 1, 2].map((r) =>
        [0, 1, 2].map((c) => (
          <rect key={`${r}-${c}`} x={4.5 + c * 5.5} y={4.5 + r * 5.5} width="4" height="4" rx="1" className="fill-ash-700" />
        )),
      )}
      <path d="M4 17.5h5.5v-5.5H15V6.5h5" fill="none" strokeWidth="2.2" strokeLinecap="round" strokeLinejoin="round" className="stroke-kiln-400" />
    </svg>
  );
}

export function Wordmark() {
  return (
    <span className="flex items-center gap-2">
      <LogoMark />
      <span className="text-[15px] font-semibold tracking-tight">Gridwright</span>
    </span>
  );
}
