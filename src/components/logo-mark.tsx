/** Ironledger's mark: a square set on its point inside a plate, with an ochre rivet. */
export function LogoMark({ size = 28 }: { size?: number }) {
  return (
    <svg width={size} height={size} viewBox="0 0 32 32" aria-hidden="true">
      <rect width="32" height="32" rx="6" fill="#2f3b4c" />
      <rect x="10" y="10" width="12" height="12" transform="rotate(45 16 16)" fill="none" stroke="#f4f2ec" strokeWidth="3" />
      <rect x="14.5" y="14.5" width="3" height="3" fill="#d39b2a" />
    </svg>
  );
}
