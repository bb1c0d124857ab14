/** Cristae's mark: three folded membrane lines. */
export function Wordmark({ className = '', light = false }: { className?: string; light?: boolean }) {
  return (
    <span className={`inline-flex items-center gap-2 ${className}`}>
      <svg viewBox="0 0 32 32" className="h-7 w-7" aria-hidden="true">
        <rect width="32" height="32" rx="9" fill={light ? '#0e2a26' : '#133a34'} />
        <path
          d="M6 11c3-5 5 5 8 0s5 5 8 0 4 3 4 3M6 17c3-5 5 5 8 0s5 5 8 0 4 3 4 3M6 23c3-5 5 5 8 0s5 5 8 0 4 3 4 3"
          fill="none"
          stroke="#dea277"
          strokeWidth="2"
          strokeLinecap="round"
        />
      </svg>
      <span className={`text-xl font-semibold tracking-tight ${light ? 'text-white' : 'text-matrix-900'}`}>Cristae</span>
    </span>
  );
}
