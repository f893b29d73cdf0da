/**
 * A duct's colour as a small chip with its name beside it. These are the only places where a colour on
 * screen stands for a real colour (the duct's sheath), so the chip wears it; the name is always written out,
 * for colour-blind readers and for the printout. A striped or traced duct shows a dark band across the chip.
 */
export function DuctSwatch({ label, hex, marking, position }: { label: string | null; hex: string | null; marking?: 'stripe' | 'tracer' | null; position?: number }) {
  if (!label || !hex) return <span className="text-ink-faint">no colour recorded</span>;
  const band = marking ? `linear-gradient(135deg, transparent 38%, #1a1a1a 38%, #1a1a1a 62%, transparent 62%), ${hex}` : hex;
  return (
    <span className="inline-flex items-center gap-1.5 whitespace-nowrap text-xs">
      <span aria-hidden="true" data-duct-colour={hex} className="inline-block h-3.5 w-3.5 rounded-full border border-ink/40" style={{ background: band }} />
      {position !== undefined && <span className="text-ink-faint">{position}</span>}
      <span>{label}</span>
    </span>
  );
}

/** The ducts of a bundle in position order, as swatches. */
export function DuctSwatches({ ducts }: { ducts: { position: number; colourLabel: string | null; colourHex: string | null; colourMarking: 'stripe' | 'tracer' | null }[] }) {
  return (
    <ol className="flex flex-wrap gap-x-3 gap-y-1" aria-label="Duct colours in bundle order">
      {ducts.map((d) => (
        <li key={d.position}>
          <DuctSwatch label={d.colourLabel} hex={d.colourHex} marking={d.colourMarking} position={d.position} />
        </li>
      ))}
    </ol>
  );
}
