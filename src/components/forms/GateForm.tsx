/**
 * A gate at a site, new or corrected on site: what it is, how it opens, its size as measured
 * (kept in the unit entered) and the operator facts the rules depend on. Checked with the
 * API's own schema before it is sent.
 */
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import {
  GATE_KIND_VALUES,
  GateCreateSchema,
  GatePatchSchema,
  OPERATOR_MOUNTINGS,
  OPERATOR_POWER,
  type Gate,
} from '@/lib/api/gates';
import type { UnitSystem } from '@/lib/units';
import { parseFeetAndInches } from '@/lib/vocabulary';
import {
  apiResolver,
  Field,
  FormMessage,
  InputField,
  SelectField,
  sendJson,
  withoutBlanks,
} from './form-kit';

type Tri = boolean | undefined;
interface Values {
  siteId: string;
  label: string;
  kind: (typeof GATE_KIND_VALUES)[number];
  leaves: 'single' | 'double';
  openingDirection: 'pull_to_open' | 'push_to_open' | undefined;
  width: { value: number; unit: string };
  height: { value: number; unit: string };
  weight: { value: number; unit: string };
  operator: {
    listed: Tri;
    automaticClosing: Tri;
    manufacturedOn: string;
    mounting: string;
    power: string;
    model: string;
  };
  installedOn: string;
}

const KIND_LABEL: Record<string, string> = {
  swing: 'Swing',
  slide: 'Slide',
  barrier_arm: 'Barrier arm',
  vertical_lift: 'Vertical lift',
  vertical_pivot: 'Vertical pivot',
  overhead_pivot: 'Overhead pivot',
};
const MOUNTING_LABEL: Record<string, string> = {
  post: 'On the post',
  pad: 'On a pad',
  wall: 'On a wall',
  column: 'On a column',
  underground: 'Underground',
  overhead: 'Overhead',
  other: 'Other',
};
const POWER_LABEL: Record<string, string> = {
  mains_ac: 'Mains AC',
  low_voltage_ac: 'Low-voltage AC',
  low_voltage_dc: 'Low-voltage DC',
  solar: 'Solar',
  other: 'Other',
};

const KIND_OPTIONS = GATE_KIND_VALUES.map((k) => ({ value: k, label: KIND_LABEL[k] ?? k }));
const LEAVES_OPTIONS = [
  { value: 'single', label: 'One leaf' },
  { value: 'double', label: 'Two leaves' },
];
const OPENING_OPTIONS = [
  { value: 'pull_to_open', label: 'Toward the operator side (pull to open)' },
  { value: 'push_to_open', label: 'Away from the operator side (push to open)' },
];
const notRecorded = { value: '', label: 'Not recorded' };
const MOUNTING_OPTIONS = [
  notRecorded,
  ...OPERATOR_MOUNTINGS.map((m) => ({ value: m, label: MOUNTING_LABEL[m] ?? m })),
];
const POWER_OPTIONS = [notRecorded, ...OPERATOR_POWER.map((p) => ({ value: p, label: POWER_LABEL[p] ?? p }))];
const TRI_OPTIONS = [
  { value: '', label: 'Not known yet' },
  { value: 'true', label: 'Yes' },
  { value: 'false', label: 'No' },
];

const triState = {
  setValueAs: (v: unknown) => (v === '' || v === undefined ? undefined : v === true || v === 'true'),
};
const number = {
  setValueAs: (v: unknown) =>
    v === '' || v === undefined ? Number.NaN : Number(String(v).replace(',', '.')),
};
/** A length field also takes feet and inches as typed (12' 6", 12 ft 6 in): kept as text until sent. */
const length = {
  setValueAs: (v: unknown) => (parseFeetAndInches(String(v ?? '')) ? String(v) : number.setValueAs(v)),
};

/** The body as the API takes it: a dimension without a number is not sent; a swing's direction only for swings. */
function toBody(values: Values, mode: 'create' | 'edit'): unknown {
  const body = withoutBlanks(values) as Record<string, unknown>;
  for (const key of ['width', 'height', 'weight']) {
    const dimension = body[key] as { value?: number | string; unit?: string } | undefined;
    if (!dimension || dimension.value === undefined) delete body[key];
    else if (typeof dimension.value === 'string') {
      // Feet and inches as typed: sent in feet (or inches), the unit it was measured in.
      const typed = parseFeetAndInches(dimension.value);
      if (typed) body[key] = { value: typed.value, unit: typed.unit };
    }
  }
  if (values.kind !== 'swing') delete body.openingDirection;
  if (mode === 'edit') delete body.siteId;
  return body;
}

interface Props {
  siteId: string;
  units: UnitSystem;
  gate?: Gate;
  /** Where to go after saving; defaults to the site. */
  next?: string;
}

/** An empty number field (the input shows nothing; `setValueAs` turns it into NaN, i.e. not given). */
const blank = '' as unknown as number;

function triDefault(value: boolean | null | undefined): Tri {
  return value === null ? undefined : value;
}

export default function GateForm({ siteId, units, gate, next }: Props) {
  const mode = gate ? 'edit' : 'create';
  const lengthUnit = units === 'metric' ? 'mm' : 'ft';
  const massUnit = units === 'metric' ? 'kg' : 'lb';
  const { register, handleSubmit, setError, formState, watch } = useForm<Values>({
    resolver: apiResolver<Values>(gate ? GatePatchSchema : GateCreateSchema, (v) => toBody(v, mode)),
    defaultValues: {
      siteId,
      label: gate?.label ?? '',
      kind: gate?.kind ?? 'swing',
      leaves: gate?.leaves ?? 'single',
      openingDirection: gate?.openingDirection ?? 'pull_to_open',
      width: { value: gate?.entered.width?.value ?? blank, unit: gate?.entered.width?.unit ?? lengthUnit },
      height: { value: gate?.entered.height?.value ?? blank, unit: gate?.entered.height?.unit ?? lengthUnit },
      weight: { value: gate?.entered.weight?.value ?? blank, unit: gate?.entered.weight?.unit ?? massUnit },
      operator: {
        listed: triDefault(gate?.operator.listed),
        automaticClosing: triDefault(gate?.operator.automaticClosing),
        manufacturedOn: gate?.operator.manufacturedOn ?? '',
        mounting: gate?.operator.mounting ?? '',
        power: gate?.operator.power ?? '',
        model: gate?.operator.model ?? '',
      },
      installedOn: gate?.installedOn ?? '',
    },
  });
  const [message, setMessage] = useState<string | null>(null);
  const errors = formState.errors;
  const kind = watch('kind');
  const onSubmit = handleSubmit(async (values) => {
    const sent = await sendJson<Gate, Values>(
      gate ? 'PATCH' : 'POST',
      gate ? `/api/gates/${gate.id}` : '/api/gates',
      toBody(values, mode),
      setError,
    );
    setMessage(sent.message);
    // A new query string, so the site page reloads with the new gate listed.
    if (sent.ok && sent.body)
      window.location.assign(next ?? `/sites/${siteId}?gate=${sent.body.id}#gate-${sent.body.id}`);
  });

  const dimension = (key: 'width' | 'height' | 'weight', label: string, unitsOffered: string[]) => (
    <Field
      label={label}
      error={errors[key]?.value?.message ?? errors[key]?.message ?? errors[key]?.unit?.message}
    >
      {(id, d) => (
        <div className="flex gap-2">
          <input
            id={id}
            aria-describedby={d}
            className="field tabular-nums"
            inputMode="decimal"
            {...register(`${key}.value`, key === 'weight' ? number : length)}
          />
          <select aria-label={`${label} unit`} className="field w-24" {...register(`${key}.unit`)}>
            {unitsOffered.map((u) => (
              <option key={u} value={u}>
                {u}
              </option>
            ))}
          </select>
        </div>
      )}
    </Field>
  );

  const tri = (
    name: 'operator.listed' | 'operator.automaticClosing',
    label: string,
    hint: string,
    error?: string,
  ) => (
    <SelectField
      label={label}
      hint={hint}
      error={error}
      registration={register(name, triState)}
      options={TRI_OPTIONS}
    />
  );

  return (
    <form onSubmit={onSubmit} noValidate className="grid gap-4 sm:grid-cols-2">
      <InputField
        label="Name of the gate"
        hint="As the owner calls it, e.g. “Driveway gate”."
        error={errors.label?.message}
        className="sm:col-span-2"
        registration={register('label')}
      />
      <SelectField
        label="Kind"
        error={errors.kind?.message}
        registration={register('kind')}
        options={KIND_OPTIONS}
      />
      <SelectField
        label="Leaves"
        error={errors.leaves?.message}
        registration={register('leaves')}
        options={LEAVES_OPTIONS}
      />
      {kind === 'swing' && (
        <SelectField
          label="Opens"
          error={errors.openingDirection?.message}
          className="sm:col-span-2"
          registration={register('openingDirection')}
          options={OPENING_OPTIONS}
        />
      )}
      {dimension('width', 'Opening width', ['mm', 'cm', 'm', 'in', 'ft'])}
      {dimension('height', 'Leaf height', ['mm', 'cm', 'm', 'in', 'ft'])}
      {dimension('weight', 'Leaf weight', ['kg', 'lb'])}
      <InputField
        label="Installed on"
        error={errors.installedOn?.message}
        registration={register('installedOn')}
        input={{ type: 'date' }}
      />
      <fieldset className="grid gap-4 rounded-lg border border-iron-200 p-3 sm:col-span-2 sm:grid-cols-2">
        <legend className="px-1 font-semibold text-iron-900">Operator</legend>
        {tri(
          'operator.listed',
          'Listed to the safety standard?',
          'A listing label on the operator, or the paperwork.',
          errors.operator?.listed?.message,
        )}
        {tri(
          'operator.automaticClosing',
          'Automatic closing on?',
          'The gate closes by itself after a delay.',
          errors.operator?.automaticClosing?.message,
        )}
        <InputField
          label="Made on (from its label)"
          error={errors.operator?.manufacturedOn?.message}
          registration={register('operator.manufacturedOn')}
          input={{ type: 'date' }}
        />
        <InputField
          label="Make and model"
          error={errors.operator?.model?.message}
          registration={register('operator.model')}
        />
        <SelectField
          label="Mounted"
          error={errors.operator?.mounting?.message}
          registration={register('operator.mounting')}
          options={MOUNTING_OPTIONS}
        />
        <SelectField
          label="Power"
          error={errors.operator?.power?.message}
          registration={register('operator.power')}
          options={POWER_OPTIONS}
        />
      </fieldset>
      <div className="grid gap-2 sm:col-span-2">
        <FormMessage message={message} />
        <button type="submit" className="btn w-full sm:w-auto" disabled={formState.isSubmitting}>
          {formState.isSubmitting ? 'Saving…' : gate ? 'Save the gate' : 'Add the gate'}
        </button>
      </div>
    </form>
  );
}
