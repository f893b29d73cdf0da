import Link from 'next/link';
import type { CheckFinding } from '@/lib/records/quality-checks';
import { CHECKS } from '@/lib/records/quality-checks';
import { formatQuantity, type UnitSystem } from '@/lib/records/units';
import { formatInZone } from '@/lib/records/zoned-time';
import type { SectionRecords } from '@/lib/services/section-records';
import { DepthPlot } from '@/components/charts/depth-plot';
import { Cautions } from '@/components/ui/cautions';
import { DuctSwatches } from '@/components/ui/duct-swatch';
import { Badge, Card } from '@/components/ui/primitives';

const ch = (m: number) => `${m.toFixed(1)} m`;

/** The open quality checks of a section, shown beside the approve button. */
export function SectionChecks({ findings }: { findings: CheckFinding[] }) {
  return (
    <Card title={<span className="flex items-center gap-2">Quality checks on this stretch <Badge tone={findings.length ? 'bad' : 'ok'}>{findings.length ? `${findings.length} open` : 'none open'}</Badge></span>}>
      {findings.length === 0 ? (
        <p className="text-sm text-ink-soft">Every check passes on this stretch.</p>
      ) : (
        <ul className="space-y-2 text-sm" aria-label="Open quality checks">
          {findings.map((f, i) => (
            <li key={`${f.check}-${f.recordId ?? ''}-${i}`} className="flex flex-wrap items-baseline gap-2">
              <Badge tone={CHECKS[f.check].severity === 'fail' ? 'bad' : 'warn'}>{CHECKS[f.check].label}</Badge>
              <span>{f.message}</span>
              <Link href={f.href} className="underline">Open</Link>
            </li>
          ))}
        </ul>
      )}
    </Card>
  );
}

/** What lies in the trench on this section's stretch, one short list a kind, each linking to its page. */
export function SectionRecordsCard({ records, projectId, system, minCoverM, timeZone, fromM, toM }: { records: SectionRecords; projectId: string; system: UnitSystem; minCoverM: number; timeZone: string; fromM: number; toM: number }) {
  const base = `/projects/${projectId}/records`;
  const r = records;
  const installed = r.ductBundles.filter((b) => b.kind === 'installed');
  const planned = r.ductBundles.filter((b) => b.kind === 'planned');
  const none = (what: string) => <p className="text-sm text-ink-soft">No {what} recorded on this stretch.</p>;
  const head = (title: string, slug: string, n: number) => (
    <h3 className="mb-2 flex items-center gap-2 text-sm font-semibold">
      <Link href={`${base}/${slug}`}>{title}</Link> <Badge tone="muted">{n}</Badge>
    </h3>
  );
  return (
    <Card title="What lies in the trench">
      <div className="space-y-6">
        <Cautions kinds={['digging']} />
        <section aria-label="Duct bundles on this stretch">
          {head('Duct bundles', 'ducts', installed.length)}
          {planned.length > 0 && <p className="mb-1 text-xs text-ink-soft">Planned: {planned.map((b) => `${b.summary} (${ch(b.fromChainageM)}–${ch(b.toChainageM)})`).join('; ')}</p>}
          {installed.length === 0 ? none('installed duct bundle') : (
            <ul className="space-y-2 text-sm">
              {installed.map((b) => (
                <li key={b.id} className="flex flex-wrap items-center gap-2">
                  <span className="font-medium">{ch(b.fromChainageM)}–{ch(b.toChainageM)}</span>
                  <span>{b.summary}</span>
                  <DuctSwatches ducts={b.ducts} />
                  {b.routeRemoved && <Badge tone="warn">route removed from plan</Badge>}
                </li>
              ))}
            </ul>
          )}
        </section>
        <section aria-label="Depth readings on this stretch">
          {head('Depth readings', 'depths', r.depthReadings.length)}
          {r.depthReadings.length === 0 ? none('depth reading') : (
            <>
              <DepthPlot readings={r.depthReadings} minCoverM={minCoverM} system={system} fromM={fromM} toM={toM} />
              <ul className="mt-2 grid gap-1 text-sm sm:grid-cols-2">
                {r.depthReadings.map((d) => (
                  <li key={d.id}>
                    at {ch(d.chainageM)}: cover {formatQuantity(d.coverM, 'depth', system)}
                    {d.coverM !== null && d.coverM < minCoverM && <> <Badge tone="bad">below minimum {formatQuantity(minCoverM, 'depth', system)}</Badge></>}
                  </li>
                ))}
              </ul>
            </>
          )}
        </section>
        <section aria-label="Test pits and utilities on this stretch">
          {head('Test pits and utilities', 'pits', r.testPits.length + r.utilityCrossings.length)}
          {r.testPits.length + r.utilityCrossings.length === 0 ? none('test pit or utility') : (
            <ul className="space-y-1 text-sm">
              {r.testPits.map((p) => <li key={p.id}>Pit {p.name || ''} at {ch(p.chainageM)}{p.dugOn ? `, dug ${p.dugOn}` : ''}{p.depthM !== null ? `, ${formatQuantity(p.depthM, 'depth', system)} deep` : ''}</li>)}
              {r.utilityCrossings.map((u) => <li key={u.id}>{u.utilityLabel}{u.owner ? ` (${u.owner})` : ''} at {ch(u.chainageM)}: clearance {formatQuantity(u.clearanceM, 'depth', system)}</li>)}
            </ul>
          )}
          {r.utilityCrossings.length > 0 && <div className="mt-2"><Cautions kinds={['utilities']} /></div>}
        </section>
        <section aria-label="Road crossings on this stretch">
          {head('Road crossings', 'crossings', r.roadCrossings.length)}
          {r.roadCrossings.length === 0 ? none('road crossing') : (
            <ul className="space-y-1 text-sm">{r.roadCrossings.map((c) => <li key={c.id}>{c.routeRef}: {c.built ? `built${c.builtOn ? ` ${c.builtOn}` : ''}` : 'not built'}{c.lengthM !== null ? `, ${formatQuantity(c.lengthM, 'length', system)}` : ''}</li>)}</ul>
          )}
        </section>
        <section aria-label="Surface restoration on this stretch">
          {head('Surface restoration', 'restoration', r.restorations.length)}
          {r.restorations.length === 0 ? none('restoration') : (
            <ul className="space-y-1 text-sm">
              {r.restorations.map((x) => (
                <li key={x.id} className="flex flex-wrap items-center gap-2">
                  <span>{ch(x.fromChainageM)}–{ch(x.toChainageM)}, {formatInZone(x.restoredAt, timeZone)}</span>
                  <Badge tone={x.check.verdict === 'pass' ? 'ok' : x.check.verdict === 'warn' ? 'warn' : 'bad'}>{x.check.verdict}</Badge>
                  <span className="text-ink-soft">{x.temperatures.map((t) => formatQuantity(t.tempC, 'temperature', system)).join(', ')}</span>
                </li>
              ))}
            </ul>
          )}
          {r.restorations.length > 0 && <div className="mt-2"><Cautions kinds={['hotBitumen']} /></div>}
        </section>
        <section aria-label="Photos on this stretch">
          {head('Photos', 'photos', r.photos.length)}
          {r.photos.length === 0 ? none('photo') : (
            <ul className="flex flex-wrap gap-3">
              {r.photos.map((p) => (
                <li key={p.id}>
                  <a href={`/api/projects/${projectId}/photos/${p.id}/original`}>
                    {/* eslint-disable-next-line @next/next/no-img-element */}
                    <img src={`/api/projects/${projectId}/photos/${p.id}/thumbnail`} alt={p.caption || `Photo at ${ch(p.chainageM)}`} className="h-24 w-auto rounded border border-ink/10" loading="lazy" />
                  </a>
                </li>
              ))}
            </ul>
          )}
        </section>
      </div>
    </Card>
  );
}
