'use client';

import { CartesianGrid, ComposedChart, Legend, Line, ReferenceLine, ResponsiveContainer, Scatter, Tooltip, XAxis, YAxis } from 'recharts';
import { coverCompliance } from '@/lib/records/depth-compliance';
import { formatQuantity, toShown, unitOf, type UnitSystem } from '@/lib/records/units';

/** What the plot needs of a reading (a `DepthReading` from `listDepthReadingsOnSection` fits). */
export interface DepthPlotReading {
  id: string;
  chainageM: number;
  coverM: number | null;
  trenchDepthM: number | null;
}

interface Point {
  chainageM: number;
  /** shown depth below the surface (shown unit), negative so that deeper plots lower */
  y: number;
  coverM: number | null;
  trenchDepthM: number | null;
}

function ReadingTip({ active, payload, system }: { active?: boolean; payload?: { payload?: Point }[]; system: UnitSystem }) {
  const p = active ? payload?.[0]?.payload : undefined;
  if (!p) return null;
  return (
    <div className="rounded border border-ink/15 bg-white px-2 py-1 text-xs shadow">
      <div>chainage {formatQuantity(p.chainageM, 'length', system)}</div>
      <div>cover {formatQuantity(p.coverM, 'depth', system)}, trench depth {formatQuantity(p.trenchDepthM, 'depth', system)}</div>
    </div>
  );
}

/**
 * Cover (and trench depth where measured) against chainage along a section, depth downwards from the
 * surface, with the project's minimum cover as a dashed line: a reading below the line is too shallow.
 * Readings below the minimum are drawn as vermilion diamonds, the others as blue circles (Okabe–Ito,
 * told apart under the common colour-vision deficiencies, and by shape).
 *
 *   <DepthPlot readings={readings} minCoverM={project.minCoverDepthM} system="metric" fromM={0} toM={140} />
 */
export function DepthPlot({ readings, minCoverM, system, fromM, toM }: { readings: DepthPlotReading[]; minCoverM: number; system: UnitSystem; fromM?: number; toM?: number }) {
  const unit = unitOf('depth', system);
  const d = (m: number) => -toShown(m, 'depth', system);
  const sorted = [...readings].sort((a, b) => a.chainageM - b.chainageM);
  const point = (r: DepthPlotReading, m: number): Point => ({ chainageM: r.chainageM, y: d(m), coverM: r.coverM, trenchDepthM: r.trenchDepthM });
  const passing = sorted.filter((r) => coverCompliance(r.coverM, minCoverM) === 'pass').map((r) => point(r, r.coverM!));
  const failing = sorted.filter((r) => coverCompliance(r.coverM, minCoverM) === 'fail').map((r) => point(r, r.coverM!));
  const trench = sorted.filter((r) => r.trenchDepthM !== null).map((r) => point(r, r.trenchDepthM!));
  const deepest = Math.max(minCoverM * 1.5, ...sorted.map((r) => Math.max(r.coverM ?? 0, r.trenchDepthM ?? 0)));
  const lo = Math.floor(d(deepest * 1.15) * 10) / 10;
  const from = fromM ?? (sorted.length ? sorted[0].chainageM : 0);
  const to = toM ?? (sorted.length ? sorted[sorted.length - 1].chainageM : 1);
  const summary = sorted.length === 0
    ? 'No depth readings on this stretch.'
    : `${sorted.length} reading${sorted.length === 1 ? '' : 's'}; ${failing.length} below the minimum cover of ${formatQuantity(minCoverM, 'depth', system)}.`;
  return (
    <figure role="img" aria-label={`Depth against chainage. ${summary}`} className="w-full">
      <div className="h-64 w-full">
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart margin={{ top: 8, right: 16, bottom: 24, left: 8 }}>
            <CartesianGrid stroke="#e5e7eb" />
            <XAxis type="number" dataKey="chainageM" domain={[Math.floor(from), Math.ceil(to)]} allowDataOverflow tickFormatter={(v: number) => formatQuantity(v, 'length', system)} label={{ value: 'chainage along the planned route', position: 'insideBottom', offset: -12, fontSize: 12 }} fontSize={12} />
            <YAxis type="number" dataKey="y" domain={[lo, 0]} allowDataOverflow tickFormatter={(v: number) => `${Math.abs(v).toFixed(system === 'metric' ? 1 : 0)}`} label={{ value: `depth below surface (${unit})`, angle: -90, position: 'insideLeft', fontSize: 12 }} fontSize={12} width={56} />
            <ReferenceLine y={d(minCoverM)} stroke="#d55e00" strokeWidth={1.5} strokeDasharray="6 4" label={{ value: `minimum cover ${formatQuantity(minCoverM, 'depth', system)}`, position: 'insideBottomRight', fontSize: 11, fill: '#a34700' }} />
            <ReferenceLine y={0} stroke="#6b7280" label={{ value: 'surface', position: 'insideTopLeft', fontSize: 11 }} />
            <Tooltip content={<ReadingTip system={system} />} />
            <Legend verticalAlign="top" height={28} wrapperStyle={{ fontSize: 12 }} />
            {trench.length > 1 && <Line name="trench depth" data={trench} dataKey="y" stroke="#6b7280" strokeDasharray="2 3" dot={false} isAnimationActive={false} type="linear" />}
            <Scatter name="cover" data={passing} fill="#0072b2" shape="circle" legendType="circle" isAnimationActive={false} />
            <Scatter name="cover below minimum" data={failing} fill="#d55e00" shape="diamond" legendType="diamond" isAnimationActive={false} />
          </ComposedChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="mt-1 text-xs text-ink-soft">
        Cover is measured from the surface to the top of the uppermost duct; the dashed vermilion line is the project&apos;s minimum. {summary}
      </figcaption>
    </figure>
  );
}
