/**
 * A new client (who the contractor works for), or, given `client`, the same form to correct an
 * existing one (PATCH with the fields that changed; a blank optional field clears it). Checked
 * with the API's own schema.
 */
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { CLIENT_KINDS, ClientCreateSchema, ClientPatchSchema, type Client } from '@/lib/api/clients';
import {
  apiResolver,
  Field,
  FormMessage,
  InputField,
  SelectField,
  sendJson,
  withoutBlanks,
} from './form-kit';

interface Values {
  name: string;
  kind: (typeof CLIENT_KINDS)[number];
  contactEmail: string;
  phone: string;
  notes: string;
}

const KIND_LABEL = {
  homeowner: 'Homeowner',
  property_manager: 'Property manager',
  business: 'Business',
} as const;
const KIND_OPTIONS = CLIENT_KINDS.map((k) => ({ value: k, label: KIND_LABEL[k] }));

/** The fields that differ from the stored client; a blanked optional field is sent as null. */
function changes(client: Client, values: Values): Partial<Record<keyof Values, string | null>> {
  const out: Partial<Record<keyof Values, string | null>> = {};
  for (const key of ['name', 'kind', 'contactEmail', 'phone', 'notes'] as const) {
    const next = values[key].trim();
    if (next !== (client[key] ?? '')) out[key] = next === '' && key !== 'name' ? null : next;
  }
  return out;
}

export default function ClientForm({ client }: { client?: Client } = {}) {
  const { register, handleSubmit, setError, formState } = useForm<Values>({
    resolver: client
      ? apiResolver<Values>(ClientPatchSchema, (values) => changes(client, values))
      : apiResolver<Values>(ClientCreateSchema),
    defaultValues: client
      ? {
          name: client.name,
          kind: client.kind,
          contactEmail: client.contactEmail ?? '',
          phone: client.phone ?? '',
          notes: client.notes ?? '',
        }
      : { name: '', kind: 'homeowner', contactEmail: '', phone: '', notes: '' },
  });
  const [message, setMessage] = useState<string | null>(null);
  const errors = formState.errors;
  const onSubmit = handleSubmit(async (values) => {
    if (client) {
      const sent = await sendJson<Client, Values>(
        'PATCH',
        `/api/clients/${client.id}`,
        changes(client, values),
        setError,
      );
      setMessage(sent.message);
      if (sent.ok) window.location.reload();
      return;
    }
    const sent = await sendJson<Client, Values>('POST', '/api/clients', withoutBlanks(values), setError);
    setMessage(sent.message);
    if (sent.ok && sent.body) window.location.assign(`/clients/${sent.body.id}`);
  });
  return (
    <form onSubmit={onSubmit} noValidate className="grid gap-4 sm:grid-cols-2">
      <InputField
        label="Name"
        error={errors.name?.message}
        className="sm:col-span-2"
        registration={register('name')}
      />
      <SelectField
        label="Kind of client"
        error={errors.kind?.message}
        registration={register('kind')}
        options={KIND_OPTIONS}
      />
      <InputField
        label="Phone"
        error={errors.phone?.message}
        registration={register('phone')}
        input={{ type: 'tel' }}
      />
      <InputField
        label="E-mail for reports and signing"
        error={errors.contactEmail?.message}
        className="sm:col-span-2"
        registration={register('contactEmail')}
        input={{ type: 'email' }}
      />
      <Field label="Notes" error={errors.notes?.message} className="sm:col-span-2">
        {(id, d) => (
          <textarea id={id} aria-describedby={d} className="field min-h-20" {...register('notes')} />
        )}
      </Field>
      <div className="grid gap-2 sm:col-span-2">
        <FormMessage message={message} />
        <button type="submit" className="btn w-full sm:w-auto" disabled={formState.isSubmitting}>
          {formState.isSubmitting ? 'Saving…' : client ? 'Save the changes' : 'Add the client'}
        </button>
      </div>
    </form>
  );
}
