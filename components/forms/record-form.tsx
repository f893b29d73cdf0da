'use client';

/**
 * The field forms of the trench records, for a phone at the kerb: one column, large targets, "use my
 * position", and a draft kept in the browser (localStorage) from the first keystroke until the server has
 * the record, so a record typed while the connection drops is never lost. Validation is react-hook-form with
 * the same zod schema as the API (zodResolver); what the server still refuses comes back per field.
 *
 *   const rf = useRecordForm({ schema: depthReadingSchema, draftKey: `depth:${projectId}`, defaults, url });
 *   <RecordForm rf={rf} title="Depth reading" submitLabel="Save reading">
 *     <NumberField rf={rf} name="coverM" label="Cover" quantity="depth" system={system} />
 *   </RecordForm>
 */
import { zodResolver } from '@hookform/resolvers/zod';
import { useRouter } from 'next/navigation';
import { useCallback, useEffect, useId, useRef, useState, type ReactNode } from 'react';
import { useForm, type FieldValues, type Path, type UseFormReturn } from 'react-hook-form';
import type { z } from 'zod';
import { Button, Field, Input, Notice, Select } from '@/components/ui/primitives';
import { fromShown, toShown, unitOf, QUANTITIES, type Quantity, type UnitSystem } from '@/lib/records/units';
import { callApi } from './api-client';

type Status = { kind: 'idle' } | { kind: 'sending' } | { kind: 'saved'; text: string } | { kind: 'kept'; text: string } | { kind: 'error'; text: string };

const DRAFT_PREFIX = 'trenchbook:draft:';

function readDraft(key: string): Record<string, unknown> | null {
  try {
    const raw = window.localStorage.getItem(DRAFT_PREFIX + key);
    return raw ? (JSON.parse(raw) as Record<string, unknown>) : null;
  } catch {
    return null;
  }
}

function writeDraft(key: string, values: unknown): void {
  try {
    window.localStorage.setItem(DRAFT_PREFIX + key, JSON.stringify(values));
  } catch {
    // storage full or blocked: the form still works, only the draft is not kept
  }
}

/** '' → undefined, deeply (arrays and objects kept): what a blank box means to the API. */
export function emptyToUndefined(v: unknown): unknown {
  if (v === '') return undefined;
  if (Array.isArray(v)) return v.map(emptyToUndefined);
  if (v && typeof v === 'object' && !(v instanceof Date)) return Object.fromEntries(Object.entries(v).map(([k, x]) => [k, emptyToUndefined(x)]));
  return v;
}

export function clearDraft(key: string): void {
  try {
    window.localStorage.removeItem(DRAFT_PREFIX + key);
  } catch {
    /* nothing to clear */
  }
}

export interface RecordFormState<T extends FieldValues> {
  form: UseFormReturn<T>;
  status: Status;
  /** a draft from an earlier visit was restored */
  restored: boolean;
  submit: () => Promise<void>;
  discard: () => void;
}

/**
 * A record form: react-hook-form + zodResolver(schema), values mirrored to a draft under `draftKey`,
 * sent as JSON to `url`. A network failure keeps the draft and sends it again when the browser is back
 * online; a refusal shows the server's message on the fields it names. `transform` may reshape values
 * before sending (e.g. drop empty optional fields).
 */
export function useRecordForm<S extends z.ZodType<FieldValues, FieldValues>>(opts: {
  schema: S;
  draftKey: string;
  defaults: z.input<S>;
  url: string;
  method?: 'POST' | 'PATCH';
  transform?: (v: z.output<S>) => unknown;
  onSaved?: (data: unknown) => void;
  savedText?: string;
}): RecordFormState<z.input<S>> {
  const router = useRouter();
  const zr = zodResolver(opts.schema as never) as unknown as (v: unknown, c: unknown, o: unknown) => never;
  const form = useForm<z.input<S>, unknown, z.output<S>>({
    // an empty select or text box means "not given": undefined, so optional fields pass the API's schema
    resolver: ((v: unknown, c: unknown, o: unknown) => zr(emptyToUndefined(v), c, o)) as never,
    defaultValues: opts.defaults as never,
    mode: 'onSubmit',
  });
  const [status, setStatus] = useState<Status>({ kind: 'idle' });
  const [restored, setRestored] = useState(false);
  const loaded = useRef(false);
  const pending = useRef(false);

  // restore a draft once, after mount (localStorage exists only in the browser)
  useEffect(() => {
    const draft = readDraft(opts.draftKey);
    if (draft) {
      form.reset({ ...(opts.defaults as object), ...draft } as never);
      setRestored(true);
    }
    loaded.current = true;
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [opts.draftKey]);

  // every change a person makes (typed, picked, or set by a field such as "Use my position") goes to the
  // draft; a reset (after saving, or discarding) names no field and writes nothing
  useEffect(() => {
    const sub = form.watch((values, info) => {
      if (loaded.current && info.name) writeDraft(opts.draftKey, values);
    });
    return () => sub.unsubscribe();
  }, [form, opts.draftKey]);

  const send = useCallback(
    async (v: z.output<S>) => {
      setStatus({ kind: 'sending' });
      writeDraft(opts.draftKey, form.getValues());
      const res = await callApi<unknown>(opts.url, opts.method ?? 'POST', opts.transform ? opts.transform(v) : v);
      if (res.ok) {
        clearDraft(opts.draftKey);
        pending.current = false;
        setRestored(false);
        form.reset(opts.defaults as never);
        setStatus({ kind: 'saved', text: opts.savedText ?? 'Saved.' });
        opts.onSaved?.(res.data);
        router.refresh();
        return;
      }
      if (res.status === 0) {
        pending.current = true;
        setStatus({ kind: 'kept', text: 'No connection: the record is kept on this device and will be sent when the connection is back.' });
        return;
      }
      for (const [path, message] of Object.entries(res.fieldErrors)) form.setError(path as Path<z.input<S>>, { message });
      setStatus({ kind: 'error', text: res.message });
    },
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [opts.url, opts.method, opts.draftKey],
  );

  const submit = useCallback(async () => {
    await form.handleSubmit(send as never, () => setStatus({ kind: 'error', text: 'Check the marked fields.' }))();
  }, [form, send]);

  // back online: send what was kept
  useEffect(() => {
    const again = () => {
      if (pending.current) void submit();
    };
    window.addEventListener('online', again);
    return () => window.removeEventListener('online', again);
  }, [submit]);

  const discard = useCallback(() => {
    clearDraft(opts.draftKey);
    pending.current = false;
    setRestored(false);
    form.reset(opts.defaults as never);
    setStatus({ kind: 'idle' });
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [opts.draftKey]);

  return { form: form as unknown as UseFormReturn<z.input<S>>, status, restored, submit, discard };
}

/** The shell: one column, the fields, a large send button, the status line and the draft notice. */
export function RecordForm<T extends FieldValues>({ rf, title, submitLabel = 'Save', children, label }: { rf: RecordFormState<T>; title?: string; submitLabel?: string; children: ReactNode; label?: string }) {
  const s = rf.status;
  return (
    <form
      aria-label={label ?? title}
      className="flex max-w-xl flex-col gap-4"
      noValidate
      onSubmit={(e) => {
        e.preventDefault();
        void rf.submit();
      }}
    >
      {title && <h3 className="text-base font-semibold">{title}</h3>}
      {rf.restored && (
        <Notice tone="info">
          A draft kept on this device was restored.{' '}
          <button type="button" className="underline" onClick={rf.discard}>
            Discard it
          </button>
        </Notice>
      )}
      {children}
      <Button type="submit" className="min-h-12 w-full text-base sm:w-auto" disabled={s.kind === 'sending'}>
        {s.kind === 'sending' ? 'Sending…' : submitLabel}
      </Button>
      <div aria-live="polite">
        {s.kind === 'saved' && <Notice tone="ok">{s.text}</Notice>}
        {s.kind === 'kept' && <Notice tone="warn">{s.text}</Notice>}
        {s.kind === 'error' && <Notice tone="bad">{s.text}</Notice>}
      </div>
    </form>
  );
}

function errorOf<T extends FieldValues>(rf: RecordFormState<T>, name: string): string | undefined {
  const parts = name.split('.');
  let e: unknown = rf.form.formState.errors;
  for (const p of parts) e = (e as Record<string, unknown> | undefined)?.[p];
  return (e as { message?: string } | undefined)?.message;
}

const big = 'min-h-12 text-base';

export function TextField<T extends FieldValues>({ rf, name, label, hint, type = 'text', multiline = false }: { rf: RecordFormState<T>; name: Path<T>; label: string; hint?: string; type?: 'text' | 'date'; multiline?: boolean }) {
  const id = useId();
  const error = errorOf(rf, name);
  return (
    <Field label={label} htmlFor={id} error={error} hint={hint}>
      {multiline ? (
        <textarea id={id} {...rf.form.register(name)} aria-invalid={!!error} rows={3} className="block w-full rounded-md border border-ink/20 bg-white px-3 py-2 text-base shadow-inner" />
      ) : (
        <Input id={id} type={type} {...rf.form.register(name)} aria-invalid={!!error} className={big} />
      )}
    </Field>
  );
}

/**
 * A number. With `quantity` the person types in the shown unit (mm or in, m or ft, °C or °F, from
 * `system`) and the form holds the stored metric value; an empty box is null (not measured).
 */
export function NumberField<T extends FieldValues>({ rf, name, label, hint, quantity, system = 'metric', step = 'any' }: { rf: RecordFormState<T>; name: Path<T>; label: string; hint?: string; quantity?: Quantity; system?: UnitSystem; step?: string }) {
  const id = useId();
  const error = errorOf(rf, name);
  const stored = rf.form.watch(name) as unknown;
  const shownOf = (v: unknown) => (typeof v === 'number' && Number.isFinite(v) ? String(quantity ? Number(toShown(v, quantity, system).toFixed(QUANTITIES[quantity].digits[system] + 2)) : v) : '');
  const [text, setText] = useState(() => shownOf(stored));
  // follow outside changes (a restored draft, a reset after saving)
  const lastSet = useRef<unknown>(stored);
  useEffect(() => {
    if (stored !== lastSet.current) {
      lastSet.current = stored;
      setText(shownOf(stored));
    }
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [stored]);
  const unit = quantity ? unitOf(quantity, system) : undefined;
  return (
    <Field label={unit ? `${label} (${unit})` : label} htmlFor={id} error={error} hint={hint}>
      <Input
        id={id}
        inputMode="decimal"
        type="text"
        step={step}
        value={text}
        aria-invalid={!!error}
        className={big}
        onChange={(e) => {
          const t = e.target.value;
          setText(t);
          const n = t.trim() === '' ? null : Number(t.replace(',', '.'));
          const v = n === null ? null : Number.isFinite(n) ? (quantity ? fromShown(n, quantity, system) : n) : t;
          lastSet.current = v;
          rf.form.setValue(name, v as never, { shouldDirty: true });
        }}
      />
    </Field>
  );
}

export function SelectField<T extends FieldValues>({ rf, name, label, hint, options, placeholder }: { rf: RecordFormState<T>; name: Path<T>; label: string; hint?: string; options: { value: string; label: string }[]; placeholder?: string }) {
  const id = useId();
  const error = errorOf(rf, name);
  return (
    <Field label={label} htmlFor={id} error={error} hint={hint}>
      <Select id={id} {...rf.form.register(name)} aria-invalid={!!error} className={big}>
        {placeholder !== undefined && <option value="">{placeholder}</option>}
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </Select>
    </Field>
  );
}

export function CheckboxField<T extends FieldValues>({ rf, name, label }: { rf: RecordFormState<T>; name: Path<T>; label: string }) {
  const id = useId();
  return (
    <label htmlFor={id} className="flex min-h-12 items-center gap-3 text-base">
      <input id={id} type="checkbox" {...rf.form.register(name)} className="h-6 w-6" />
      {label}
    </label>
  );
}

/** A wall-clock date and time on the project's clock (`YYYY-MM-DDTHH:mm`); the server converts it with the project's zone. */
export function DateTimeField<T extends FieldValues>({ rf, name, label, hint }: { rf: RecordFormState<T>; name: Path<T>; label: string; hint?: string }) {
  const id = useId();
  const error = errorOf(rf, name);
  return (
    <Field label={label} htmlFor={id} error={error} hint={hint}>
      <Input id={id} type="datetime-local" {...rf.form.register(name)} aria-invalid={!!error} className={big} />
    </Field>
  );
}

export interface RouteOption {
  id: string;
  ref: string;
  street: string | null;
  lengthM: number;
}

const routeLabel = (r: RouteOption, system: UnitSystem) => `${r.ref}${r.street ? ` · ${r.street}` : ''} (${toShown(r.lengthM, 'length', system).toFixed(0)} ${unitOf('length', system)})`;

/** Route and from/to chainage: the stretch a record covers (fields routeId, fromChainageM, toChainageM). */
export function RouteStretchFields<T extends FieldValues>({ rf, routes, system = 'metric' }: { rf: RecordFormState<T>; routes: RouteOption[]; system?: UnitSystem }) {
  return (
    <>
      <SelectField rf={rf} name={'routeId' as Path<T>} label="Route" placeholder="Pick the route" options={routes.map((r) => ({ value: r.id, label: routeLabel(r, system) }))} />
      <NumberField rf={rf} name={'fromChainageM' as Path<T>} label="From chainage" quantity="length" system={system} />
      <NumberField rf={rf} name={'toChainageM' as Path<T>} label="To chainage" quantity="length" system={system} />
    </>
  );
}

/**
 * A point: a position (lon/lat; "Use my position" asks the browser's geolocation) or, when `routes` are
 * given, a route and chainage instead. Fields: lon, lat (and routeId, chainageM).
 */
export function PositionFields<T extends FieldValues>({ rf, routes, system = 'metric' }: { rf: RecordFormState<T>; routes?: RouteOption[]; system?: UnitSystem }) {
  const [mode, setMode] = useState<'position' | 'chainage'>('position');
  const [note, setNote] = useState<string | null>(null);
  const set = (k: string, v: unknown) => rf.form.setValue(k as Path<T>, v as never, { shouldDirty: true });
  function locate() {
    if (!('geolocation' in navigator)) return setNote('This browser cannot give a position: type it, or pick the route and chainage.');
    setNote('Finding your position…');
    navigator.geolocation.getCurrentPosition(
      (p) => {
        set('lon', Number(p.coords.longitude.toFixed(7)));
        set('lat', Number(p.coords.latitude.toFixed(7)));
        setNote(`Position taken (±${Math.round(p.coords.accuracy)} m as the phone reports it).`);
      },
      (e) => setNote(e.code === e.PERMISSION_DENIED ? 'Position not allowed: allow it in the browser, or type it.' : 'No position could be found: type it, or pick the route and chainage.'),
      { enableHighAccuracy: true, timeout: 15000, maximumAge: 0 },
    );
  }
  return (
    <fieldset className="flex flex-col gap-4">
      <legend className="mb-2 text-sm font-medium">Where</legend>
      {routes && (
        <div className="flex gap-2" role="group" aria-label="Place by">
          <Button type="button" variant={mode === 'position' ? 'primary' : 'secondary'} className="min-h-12 flex-1" onClick={() => { setMode('position'); set('chainageM', undefined); }}>
            Position
          </Button>
          <Button type="button" variant={mode === 'chainage' ? 'primary' : 'secondary'} className="min-h-12 flex-1" onClick={() => { setMode('chainage'); set('lon', undefined); set('lat', undefined); }}>
            Route and chainage
          </Button>
        </div>
      )}
      {mode === 'position' ? (
        <>
          <Button type="button" variant="secondary" className="min-h-12 text-base" onClick={locate}>
            Use my position
          </Button>
          {note && <p className="text-sm text-ink-soft" aria-live="polite">{note}</p>}
          <NumberField rf={rf} name={'lon' as Path<T>} label="Longitude (°)" />
          <NumberField rf={rf} name={'lat' as Path<T>} label="Latitude (°)" />
          {routes && <SelectField rf={rf} name={'routeId' as Path<T>} label="Route (optional: else the nearest)" placeholder="The nearest route" options={routes.map((r) => ({ value: r.id, label: routeLabel(r, system) }))} />}
        </>
      ) : (
        <>
          <SelectField rf={rf} name={'routeId' as Path<T>} label="Route" placeholder="Pick the route" options={(routes ?? []).map((r) => ({ value: r.id, label: routeLabel(r, system) }))} />
          <NumberField rf={rf} name={'chainageM' as Path<T>} label="Chainage" quantity="length" system={system} />
        </>
      )}
    </fieldset>
  );
}
