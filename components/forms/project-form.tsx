'use client';

import { useRouter } from 'next/navigation';
import { useMemo, useState } from 'react';
import { Button, Field, Input, Notice, Select } from '@/components/ui/primitives';
import { ACCURACY_CLASS_LABELS, ACCURACY_CLASSES, DEFAULT_SIGMA_M } from '@/lib/records/accuracy-classes';
import { RANGES, rangeProblem, rangeText } from '@/lib/records/plausible-ranges';
import { callApi } from './api-client';
import { RegisterOrganisation } from './register-organisation';

export interface PickableOrganisation {
  id: string;
  name: string;
}

export interface ProjectFormValues {
  name: string;
  areaName: string;
  defaultCrs: string;
  extent: [number, number, number, number] | null;
  timeZone: string;
  unitSystem: 'metric' | 'imperial';
  minCoverDepthM: number;
  lateralToleranceM: number;
  defaultAccuracyClass: keyof typeof ACCURACY_CLASS_LABELS;
  accuracySigmas: Partial<Record<keyof typeof ACCURACY_CLASS_LABELS, number>>;
}

export function ProjectForm({
  mode,
  projectId,
  initial,
  partner,
}: {
  mode: 'create' | 'edit';
  projectId?: string;
  initial: ProjectFormValues;
  /** create: the registered organisations of the other side to pick from; edit: omitted (changed by proposal) */
  partner?: { label: string; kind: 'owner' | 'contractor'; options: PickableOrganisation[] };
}) {
  const router = useRouter();
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<{ tone: 'bad' | 'ok'; text: string } | null>(null);
  const [busy, setBusy] = useState(false);
  const zones = useMemo(() => ['UTC', ...Intl.supportedValuesOf('timeZone')], []);

  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const s = (k: string) => String(f.get(k) ?? '').trim();
    const extentParts = ['west', 'south', 'east', 'north'].map(s);
    const local: Record<string, string> = {};
    let extent: ProjectFormValues['extent'] = null;
    if (extentParts.some((x) => x !== '')) {
      const nums = extentParts.map(Number);
      if (extentParts.some((x) => x === '') || nums.some((n) => !Number.isFinite(n))) local.extent = 'Give all four bounds as decimal degrees, or none.';
      else extent = nums as [number, number, number, number];
    }
    // a decimal comma is how many surveyors type metres
    const num = (k: string) => (s(k) === '' ? NaN : Number(s(k).replace(',', '.')));
    for (const k of ['minCoverDepthM', 'lateralToleranceM'] as const) {
      const problem = rangeProblem(RANGES[k], num(k));
      if (problem) local[k] = problem;
    }
    const accuracySigmas: Record<string, number> = {};
    for (const c of ACCURACY_CLASSES) {
      if (s(`sigma-${c}`) === '') continue;
      const v = num(`sigma-${c}`);
      const problem = rangeProblem({ ...RANGES.sigmaM, what: `The typical error for ${ACCURACY_CLASS_LABELS[c]}` }, v);
      if (problem) local.accuracySigmas = problem;
      else accuracySigmas[c] = v;
    }
    if (!s('name')) local.name = 'Name the project.';
    if (partner && !s('partnerOrganisationId')) local.partnerOrganisationId = `Pick the ${partner.label.toLowerCase()} from the list, or register it first.`;
    if (Object.keys(local).length) {
      setErrors(local);
      setMessage({ tone: 'bad', text: 'Some fields need attention.' });
      return;
    }
    const body = {
      name: s('name'),
      ...(partner ? { partnerOrganisationId: s('partnerOrganisationId') } : {}),
      areaName: s('areaName'),
      defaultCrs: s('defaultCrs'),
      extent,
      timeZone: s('timeZone'),
      unitSystem: s('unitSystem'),
      minCoverDepthM: num('minCoverDepthM'),
      lateralToleranceM: num('lateralToleranceM'),
      defaultAccuracyClass: s('defaultAccuracyClass'),
      accuracySigmas,
    };
    setBusy(true);
    const res =
      mode === 'create'
        ? await callApi<{ project: { id: string } }>('/api/projects', 'POST', body)
        : await callApi<{ project: { id: string } }>(`/api/projects/${projectId}`, 'PATCH', body);
    setBusy(false);
    if (!res.ok) {
      setErrors(res.fieldErrors);
      setMessage({ tone: 'bad', text: Object.keys(res.fieldErrors).length ? 'Some fields need attention.' : res.message });
      return;
    }
    setErrors({});
    if (mode === 'create') router.push(`/projects/${res.data.project.id}`);
    else {
      setMessage({ tone: 'ok', text: 'Settings saved.' });
      router.refresh();
    }
  }

  const err = (k: string) => errors[k];
  return (
    <form onSubmit={onSubmit} className="grid gap-5 md:grid-cols-2" noValidate>
      {message && (
        <div className="md:col-span-2" role="status">
          <Notice tone={message.tone}>{message.text}</Notice>
        </div>
      )}
      <Field label="Project name" htmlFor="name" error={err('name')}>
        <Input id="name" name="name" defaultValue={initial.name} aria-invalid={!!err('name')} />
      </Field>
      {partner && <PartnerPicker partner={partner} error={err('partnerOrganisationId')} />}
      <Field label="Area name" htmlFor="areaName" error={err('areaName')}>
        <Input id="areaName" name="areaName" defaultValue={initial.areaName} />
      </Field>
      <Field label="Default coordinate system" htmlFor="defaultCrs" error={err('defaultCrs')} hint="The EPSG number of the grid your surveyors usually work in, e.g. 25832 (ETRS89 / UTM zone 32N).">
        <Input id="defaultCrs" name="defaultCrs" defaultValue={initial.defaultCrs} aria-invalid={!!err('defaultCrs')} />
      </Field>
      <fieldset className="md:col-span-2">
        <legend className="text-sm font-medium">Extent (optional, decimal degrees WGS 84; later derived from the planned network)</legend>
        <div className="mt-1 grid grid-cols-2 gap-3 sm:grid-cols-4">
          {(['west', 'south', 'east', 'north'] as const).map((k, i) => (
            <Field key={k} label={k[0].toUpperCase() + k.slice(1)} htmlFor={`extent-${k}`}>
              <Input id={`extent-${k}`} name={k} inputMode="decimal" defaultValue={initial.extent ? String(initial.extent[i]) : ''} />
            </Field>
          ))}
        </div>
        {err('extent') && <p className="mt-1 text-xs font-medium text-status-bad">{err('extent')}</p>}
      </fieldset>
      <Field label="Time zone" htmlFor="timeZone" error={err('timeZone')}>
        <Select id="timeZone" name="timeZone" defaultValue={initial.timeZone}>
          {zones.map((z) => (
            <option key={z}>{z}</option>
          ))}
        </Select>
      </Field>
      <Field label="Units shown" htmlFor="unitSystem" error={err('unitSystem')}>
        <Select id="unitSystem" name="unitSystem" defaultValue={initial.unitSystem}>
          <option value="metric">Metric (m)</option>
          <option value="imperial">Imperial (ft, in)</option>
        </Select>
      </Field>
      <Field label="Minimum cover depth (m)" htmlFor="minCoverDepthM" error={err('minCoverDepthM')} hint={`From the top of the duct bundle to the finished surface, as your contract or local code requires (${rangeText(RANGES.minCoverDepthM)}).`}>
        <Input id="minCoverDepthM" name="minCoverDepthM" inputMode="decimal" defaultValue={String(initial.minCoverDepthM)} aria-invalid={!!err('minCoverDepthM')} />
      </Field>
      <Field label="Lateral tolerance (m)" htmlFor="lateralToleranceM" error={err('lateralToleranceM')} hint={`How far the built trench may sit from the design before it counts as a deviation (${rangeText(RANGES.lateralToleranceM)}).`}>
        <Input id="lateralToleranceM" name="lateralToleranceM" inputMode="decimal" defaultValue={String(initial.lateralToleranceM)} aria-invalid={!!err('lateralToleranceM')} />
      </Field>
      <Field label="Default accuracy of uploads" htmlFor="defaultAccuracyClass" error={err('defaultAccuracyClass')}>
        <Select id="defaultAccuracyClass" name="defaultAccuracyClass" defaultValue={initial.defaultAccuracyClass}>
          {Object.entries(ACCURACY_CLASS_LABELS).map(([v, l]) => (
            <option key={v} value={v}>
              {l}
            </option>
          ))}
        </Select>
      </Field>
      <fieldset className="md:col-span-2">
        <legend className="text-sm font-medium">Typical position error of each kind of survey, in metres</legend>
        <p className="text-xs text-ink-soft">
          One standard deviation east–west and north–south ({rangeText(RANGES.sigmaM)}). Leave a box empty to keep the usual figure shown under it.
        </p>
        <div className="mt-1 grid grid-cols-2 gap-3 sm:grid-cols-5">
          {ACCURACY_CLASSES.map((c) => (
            <Field key={c} label={ACCURACY_CLASS_LABELS[c]} htmlFor={`sigma-${c}`} hint={`usually ${DEFAULT_SIGMA_M[c]} m`}>
              <Input id={`sigma-${c}`} name={`sigma-${c}`} inputMode="decimal" defaultValue={initial.accuracySigmas[c] === undefined ? '' : String(initial.accuracySigmas[c])} aria-invalid={!!err('accuracySigmas')} />
            </Field>
          ))}
        </div>
        {err('accuracySigmas') && <p className="mt-1 text-xs font-medium text-status-bad">{err('accuracySigmas')}</p>}
      </fieldset>
      <div className="md:col-span-2">
        <Button type="submit" disabled={busy}>
          {mode === 'create' ? 'Create project' : 'Save settings'}
        </Button>
      </div>
    </form>
  );
}

/**
 * The partner organisation, picked from the registered ones. Registering a new one is a separate,
 * deliberate step (its own button and confirmation), so that a typo never becomes an organisation.
 */
function PartnerPicker({ partner, error }: { partner: NonNullable<Parameters<typeof ProjectForm>[0]['partner']>; error?: string }) {
  const [options, setOptions] = useState(partner.options);
  const [picked, setPicked] = useState('');
  const side = partner.kind === 'owner' ? 'network owner' : 'contractor';

  return (
    <div className="space-y-2">
      <Field label={partner.label} htmlFor="partnerOrganisationId" error={error} hint={`Pick the ${side} from the organisations registered in Trenchbook.`}>
        <Select id="partnerOrganisationId" name="partnerOrganisationId" value={picked} onChange={(e) => setPicked(e.target.value)} aria-invalid={!!error}>
          <option value="">Pick the {side}…</option>
          {options.map((o) => (
            <option key={o.id} value={o.id}>
              {o.name}
            </option>
          ))}
        </Select>
      </Field>
      <RegisterOrganisation
        kind={partner.kind}
        onRegistered={(org) => {
          setOptions((o) => [...o, org].sort((a, b) => a.name.localeCompare(b.name)));
          setPicked(org.id);
        }}
      />
    </div>
  );
}
