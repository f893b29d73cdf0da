/** The Trenchbook mark: a slot in section with three ducts in it. */
export function BrandMark({ className = 'h-7 w-7' }: { className?: string }) {
  return (
    <svg viewBox="0 0 32 32" className={className} aria-hidden="true">
      <rect x="2" y="2" width="28" height="28" rx="6" fill="#1d5c63" />
      <path d="M12 7h8v18h-8z" fill="#f6f4ef" />
      <circle cx="16" cy="20.5" r="2.3" fill="#e69f00" />
      <circle cx="16" cy="15.5" r="2.3" fill="#0072b2" />
      <circle cx="16" cy="10.5" r="2.3" fill="#009e73" />
    </svg>
  );
}
