/** A new site for a client: where gates stand, with the UL 325 usage class that sets the rules. */
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { SiteCreateSchema, SitePatchSchema, type Site } from '@/lib/api/sites';
import { apiResolver, Field, FormMessage, InputField, sendJson, withoutBlanks } from './form-kit';

interface Values {
  clientId: string;
  name: string;
  addressLine1: string;
  addressLine2: string;
  city: string;
  region: string;
  postalCode: string;
  country: string;
  /** As the radio buttons hold it ("1"…"4"); a number in the body sent to the API. */
  usageClass: string;
  notes: string;
}

/**
 * The body the API takes. Radio inputs always carry their value as text (react-hook-form does
 * not apply `setValueAs` to radios), so the class becomes a number here, before the schema
 * checks it and before it is sent.
 */
function toBody(values: Values): unknown {
  return withoutBlanks({
    ...values,
    usageClass: values.usageClass === '' ? undefined : Number(values.usageClass),
  });
}

export const USAGE_CLASS_TEXT = [
  { value: 1, title: 'Class I · residential', text: 'A home, or up to four homes sharing a drive.' },
  {
    value: 2,
    title: 'Class II · commercial, public',
    text: 'Apartments, shops, car parks: the public can reach it.',
  },
  { value: 3, title: 'Class III · industrial', text: 'Factory or yard gates, not meant for the public.' },
  {
    value: 4,
    title: 'Class IV · restricted, supervised',
    text: 'Guarded entries: prisons, airport security.',
  },
] as const;

const TEXT_FIELDS = [
  'name',
  'addressLine1',
  'addressLine2',
  'city',
  'region',
  'postalCode',
  'country',
  'notes',
] as const;

/** For an edit: the fields that differ from the stored site; a blanked optional one is sent as null. */
function changes(site: Site, values: Values): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const key of TEXT_FIELDS) {
    const next = values[key].trim();
    if (next !== ((site[key] as string | null) ?? ''))
      out[key] = next === '' && key !== 'addressLine1' && key !== 'city' && key !== 'country' ? null : next;
  }
  if (Number(values.usageClass) !== site.usageClass) out.usageClass = Number(values.usageClass);
  return out;
}

/** A new site for `clientId`, or, given `site`, the same form to correct that site (PATCH of the changed fields). */
export default function SiteForm({ clientId, site }: { clientId: string; site?: Site }) {
  const { register, handleSubmit, setError, formState } = useForm<Values>({
    resolver: site
      ? apiResolver<Values>(SitePatchSchema, (values) => changes(site, values))
      : apiResolver<Values>(SiteCreateSchema, toBody),
    defaultValues: site
      ? {
          clientId,
          name: site.name ?? '',
          addressLine1: site.addressLine1,
          addressLine2: site.addressLine2 ?? '',
          city: site.city ?? '',
          region: site.region ?? '',
          postalCode: site.postalCode ?? '',
          country: site.country ?? 'US',
          usageClass: String(site.usageClass),
          notes: site.notes ?? '',
        }
      : {
          clientId,
          name: '',
          addressLine1: '',
          addressLine2: '',
          city: '',
          region: '',
          postalCode: '',
          country: 'US',
          usageClass: '1',
          notes: '',
        },
  });
  const [message, setMessage] = useState<string | null>(null);
  const errors = formState.errors;
  const onSubmit = handleSubmit(async (values) => {
    if (site) {
      const sent = await sendJson<Site, Values>(
        'PATCH',
        `/api/sites/${site.id}`,
        changes(site, values),
        setError,
      );
      setMessage(sent.message);
      if (sent.ok) window.location.reload();
      return;
    }
    const sent = await sendJson<Site, Values>('POST', '/api/sites', toBody(values), setError);
    setMessage(sent.message);
    if (sent.ok && sent.body) window.location.assign(`/sites/${sent.body.id}`);
  });
  return (
    <form onSubmit={onSubmit} noValidate className="grid gap-4 sm:grid-cols-2">
      <input type="hidden" {...register('clientId')} />
      <InputField
        label="Street address"
        error={errors.addressLine1?.message}
        className="sm:col-span-2"
        registration={register('addressLine1')}
      />
      <InputField label="Town or city" error={errors.city?.message} registration={register('city')} />
      <InputField label="State or region" error={errors.region?.message} registration={register('region')} />
      <InputField
        label="Postal code"
        error={errors.postalCode?.message}
        registration={register('postalCode')}
      />
      <InputField
        label="Country (two letters)"
        error={errors.country?.message}
        registration={register('country')}
        input={{ className: 'uppercase', maxLength: 2 }}
      />
      <InputField
        label="Name of the site (optional)"
        hint="For example “Main house” or “Rear yard”."
        error={errors.name?.message}
        className="sm:col-span-2"
        registration={register('name')}
      />
      <fieldset className="sm:col-span-2">
        <legend className="label">Who uses the gate (usage class)</legend>
        <div className="grid gap-2 sm:grid-cols-2">
          {USAGE_CLASS_TEXT.map((c) => (
            <label
              key={c.value}
              className="flex min-h-11 cursor-pointer items-start gap-3 rounded-lg border border-iron-200 bg-white p-3 has-checked:border-iron-800 has-checked:bg-iron-50"
            >
              <input
                type="radio"
                className="mt-1 size-5 accent-iron-800"
                value={String(c.value)}
                {...register('usageClass')}
              />
              <span>
                <span className="block font-semibold text-iron-900">{c.title}</span>
                <span className="block text-sm text-iron-600">{c.text}</span>
              </span>
            </label>
          ))}
        </div>
        {errors.usageClass?.message && (
          <p className="mt-1 text-sm font-semibold text-withdraw">{errors.usageClass.message}</p>
        )}
      </fieldset>
      <Field label="Notes" error={errors.notes?.message} className="sm:col-span-2">
        {(id, d) => (
          <textarea id={id} aria-describedby={d} className="field min-h-20" {...register('notes')} />
        )}
      </Field>
      <div className="grid gap-2 sm:col-span-2">
        <FormMessage message={message} />
        <button type="submit" className="btn w-full sm:w-auto" disabled={formState.isSubmitting}>
          {formState.isSubmitting ? 'Saving…' : site ? 'Save the changes' : 'Add the site'}
        </button>
      </div>
    </form>
  );
}
