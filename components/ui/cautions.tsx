import { CAUTIONS, type CautionKind } from '@/lib/records/cautions';

/** The usual cautions, one line each, where depths, clearances or laying temperatures are shown. */
export function Cautions({ kinds }: { kinds: CautionKind[] }) {
  return (
    <aside role="note" aria-label="Cautions" className="space-y-1 rounded-md border border-status-warn/60 bg-status-warn/10 px-3 py-2 text-sm">
      {kinds.map((k) => (
        <p key={k} data-caution={k}>
          <span aria-hidden="true" className="mr-1 font-semibold">⚠</span>
          {CAUTIONS[k]}
        </p>
      ))}
    </aside>
  );
}
