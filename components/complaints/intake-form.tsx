'use client';

import { useActionState, useState } from 'react';
import { TextArea } from '@/components/ui/form-bits';
import { SelectField, TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { SubmitButton } from '@/components/ui/submit-button';
import { complainantKindLabels, complainantKinds, intakeChannelLabels, intakeChannels } from '@/lib/complaints/labels';
import type { ProductOptionDto } from '@/lib/complaints/queries';
import { type ComplaintFormAction, idleComplaintFormState } from './form-state';

/*
 * Taking a complaint down, on a tablet at the phone or at a desk: one column of large fields, the
 * questions in the order a caller answers them. The lot is checked on the server against the batch
 * records (a known lot fills the product; an unknown one is kept and flagged); everything typed
 * comes back after a refusal, with the reason beside its field.
 */

export function IntakeForm({ action, products, today }: { action: ComplaintFormAction; products: ProductOptionDto[]; today: string }) {
  const [state, formAction] = useActionState(action, idleComplaintFormState);
  const v = state.values;
  const e = state.fieldErrors;
  const [harmed, setHarmed] = useState(v.personHarmed === 'on');
  return (
    <form action={formAction} noValidate className="flex max-w-3xl flex-col gap-6" data-testid="complaint-intake">
      {state.failed && state.message ? <Notice tone="danger" title={state.message} /> : null}
      <fieldset className="flex flex-col gap-4 rounded-lg border border-ink-200 bg-white p-5">
        <legend className="px-1 text-lg font-semibold">Who complained</legend>
        <TextField name="complainantName" label="Name" required autoComplete="off" defaultValue={v.complainantName ?? ''} errors={e.complainantName} />
        <TextField
          name="complainantContact"
          label="How to reach them"
          hint="An e-mail address lets QA send the answer from here; a telephone number or postal address works too."
          required
          autoComplete="off"
          defaultValue={v.complainantContact ?? ''}
          errors={e.complainantContact}
        />
        <fieldset className="flex flex-col gap-1">
          <legend className="font-semibold text-ink-900">They are a…</legend>
          <div className="flex flex-wrap gap-x-6">
            {complainantKinds.map((k) => (
              <label key={k} className="inline-flex min-h-11 items-center gap-2">
                <input type="radio" name="complainantKind" value={k} defaultChecked={(v.complainantKind ?? 'consumer') === k} className="h-5 w-5" />
                {complainantKindLabels[k]}
              </label>
            ))}
          </div>
        </fieldset>
        <div className="grid grid-cols-1 gap-4 md:grid-cols-2">
          <SelectField
            name="channel"
            label="It reached us by"
            options={intakeChannels.map((c) => ({ value: c, label: intakeChannelLabels[c] }))}
            defaultValue={v.channel ?? 'phone'}
            errors={e.channel}
          />
          <TextField name="receivedOn" label="Received on" type="date" required max={today} defaultValue={v.receivedOn ?? today} errors={e.receivedOn} />
        </div>
      </fieldset>

      <fieldset className="flex flex-col gap-4 rounded-lg border border-ink-200 bg-white p-5">
        <legend className="px-1 text-lg font-semibold">Which product</legend>
        <TextField
          name="lot"
          label="Lot number as they read it"
          hint="Printed on the label, e.g. BW-2026-1012-A. Leave empty if they cannot find it."
          autoComplete="off"
          autoCapitalize="characters"
          defaultValue={v.lot ?? ''}
          errors={e.lot}
        />
        <SelectField
          name="productId"
          label="Product"
          hint="Needed when the lot is missing or not in our batch records; a known lot fills it."
          options={[{ value: '', label: 'Pick the product' }, ...products.map((p) => ({ value: String(p.id), label: p.label }))]}
          defaultValue={v.productId ?? ''}
          errors={e.productId}
        />
      </fieldset>

      <fieldset className="flex flex-col gap-4 rounded-lg border border-ink-200 bg-white p-5">
        <legend className="px-1 text-lg font-semibold">What they found</legend>
        <TextArea
          name="description"
          label="In their words"
          hint="What they saw, smelt or felt, how many and where (in the bottle, the blister)."
          required
          rows={5}
          maxLength={5000}
          defaultValue={v.description ?? ''}
          errors={e.description}
        />
        <TextField name="unitsAffected" label="Capsules affected" type="number" inputMode="numeric" min={0} className="max-w-40" defaultValue={v.unitsAffected ?? ''} errors={e.unitsAffected} />
        <label className="inline-flex min-h-11 items-center gap-3 font-semibold">
          <input type="checkbox" name="personHarmed" defaultChecked={harmed} onChange={(ev) => setHarmed(ev.currentTarget.checked)} className="h-6 w-6" />
          Someone was harmed or felt unwell
        </label>
        {harmed || e.harmDescription ? (
          <TextArea
            name="harmDescription"
            label="How were they harmed?"
            hint="What happened to them, when, and whether they saw a doctor or went to hospital. QA decides from this whether a report is due within days."
            required
            rows={4}
            maxLength={5000}
            defaultValue={v.harmDescription ?? ''}
            errors={e.harmDescription}
          />
        ) : null}
        <label className="inline-flex min-h-11 items-center gap-3 font-semibold">
          <input type="checkbox" name="samplesReturning" defaultChecked={v.samplesReturning === 'on'} className="h-6 w-6" />
          They are sending the capsules back
        </label>
      </fieldset>
      <div>
        <SubmitButton pendingLabel="Saving…">Save the complaint</SubmitButton>
      </div>
    </form>
  );
}
