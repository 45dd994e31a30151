import { longDate } from '../../../../shared/billing/dates.ts';
import { formatRate } from '../../../../shared/billing/money.ts';
import { priceItemInfo, priceItems, type Price, type PriceInput, type TaxRateInput } from '../../../../shared/schemas/billing.ts';
import { ChoiceField, OptionList, TextField } from '@/components/form/bound-fields';
import { parseDecimal } from '@/components/form/decimal';
import { FormFrame } from '@/components/form/form-frame';
import { NumberField } from '@/components/form/number-field';
import { ProblemAlert } from '@/components/form/problem-alert';
import { useApiForm } from '@/components/form/use-api-form';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import {
  priceInputSchema,
  taxRateInputSchema,
  useAddPrice,
  useAddTaxRate,
  useWithdrawPrice,
  useWithdrawTaxRate,
  type PriceListResponse,
} from '@/features/billing/api/price-list';
import { Money } from '@/features/billing/components/money';
import { MoneyField } from '@/features/billing/components/money-field';

const itemLabel = (p: Pick<Price, 'item' | 'bandMaxLiters'>) =>
  p.item === 'fermenter_day' ? `${priceItemInfo.fermenter_day.label}, up to ${p.bandMaxLiters} L` : priceItemInfo[p.item].label;

/** Every price row grouped by item (and band): in effect now, scheduled, and what applied before. */
const PriceTable = ({ data }: { data: PriceListResponse }) => {
  const withdraw = useWithdrawPrice();
  const groups = new Map<string, Price[]>();
  for (const p of data.items) {
    const key = `${priceItems.indexOf(p.item).toString().padStart(2, '0')}:${String(p.bandMaxLiters ?? 0).padStart(6, '0')}`;
    groups.set(key, [...(groups.get(key) ?? []), p]);
  }
  const ordered = [...groups.entries()].sort(([a], [b]) => a.localeCompare(b));
  const missing = priceItems.filter((i) => !data.items.some((p) => p.item === i));
  return (
    <div className="overflow-x-auto rounded-md border border-line bg-surface">
      <table className="w-full text-sm">
        <caption className="sr-only">The price list</caption>
        <thead className="bg-ground-deep text-left text-xs tracking-wide text-ink-muted uppercase">
          <tr>
            <th scope="col" className="px-3 py-2">
              Item
            </th>
            <th scope="col" className="px-3 py-2 text-right">
              In effect today
            </th>
            <th scope="col" className="px-3 py-2">
              Scheduled
            </th>
            <th scope="col" className="px-3 py-2">
              Before
            </th>
          </tr>
        </thead>
        <tbody>
          {ordered.map(([key, rows]) => {
            const current = rows.find((r) => r.current);
            const future = rows.filter((r) => r.effectiveFrom > data.today).sort((a, b) => a.effectiveFrom.localeCompare(b.effectiveFrom));
            const past = rows.filter((r) => r.effectiveFrom <= data.today && !r.current);
            const first = rows[0]!;
            return (
              <tr key={key} className="border-t border-line align-top">
                <th scope="row" className="px-3 py-2 text-left font-medium">
                  {itemLabel(first)}
                  <span className="block text-xs font-normal text-ink-muted">
                    per {priceItemInfo[first.item].unit} · {priceItemInfo[first.item].help}
                  </span>
                </th>
                <td className="px-3 py-2 text-right">
                  {current ? (
                    <>
                      <Money cents={current.unitCents} currency={data.currency} className="font-medium" />
                      <span className="block text-xs text-ink-muted">since {longDate(current.effectiveFrom)}</span>
                    </>
                  ) : (
                    <span className="text-ink-muted">not yet priced</span>
                  )}
                </td>
                <td className="px-3 py-2">
                  {future.length === 0 ? <span className="text-ink-muted">—</span> : null}
                  {future.map((f) => (
                    <div key={f.id} className="flex flex-wrap items-center gap-2">
                      <Badge tone="copper">
                        <Money cents={f.unitCents} currency={data.currency} />
                        {` from ${longDate(f.effectiveFrom)}`}
                      </Badge>
                      {f.note ? <span className="text-xs text-ink-muted">{f.note}</span> : null}
                      <Button
                        size="sm"
                        variant="ghost"
                        pending={withdraw.isPending && withdraw.variables === f.id}
                        onClick={() => withdraw.mutate(f.id)}
                        aria-label={`Withdraw the ${itemLabel(f)} price from ${longDate(f.effectiveFrom)}`}
                      >
                        Withdraw
                      </Button>
                    </div>
                  ))}
                </td>
                <td className="px-3 py-2 text-xs text-ink-muted">
                  {past.length === 0
                    ? '—'
                    : past.map((h) => (
                        <div key={h.id}>
                          <Money cents={h.unitCents} currency={data.currency} />
                          {` from ${longDate(h.effectiveFrom)}`}
                        </div>
                      ))}
                </td>
              </tr>
            );
          })}
          {missing.map((i) => (
            <tr key={i} className="border-t border-line">
              <th scope="row" className="px-3 py-2 text-left font-medium">
                {priceItemInfo[i].label}
              </th>
              <td className="px-3 py-2 text-right text-ink-muted" colSpan={3}>
                Not priced; usage of this kind cannot be billed until it is.
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <ProblemAlert error={withdraw.error} className="m-3" />
    </div>
  );
};

const AddPriceForm = ({ data }: { data: PriceListResponse }) => {
  const add = useAddPrice();
  const { form, setMessage, frame } = useApiForm<PriceInput>(priceInputSchema, {
    defaultValues: { item: 'fermenter_day', bandMaxLiters: 60, effectiveFrom: data.today, note: '' },
    fields: ['item', 'bandMaxLiters', 'unitCents', 'effectiveFrom', 'note'],
  });
  const item = form.watch('item');
  const send = async (values: PriceInput) => {
    const { price } = await add.mutateAsync({ ...values, bandMaxLiters: values.item === 'fermenter_day' ? values.bandMaxLiters : null });
    setMessage({ tone: 'success', text: `${itemLabel(price)}: new price from ${longDate(price.effectiveFrom)}.` });
    form.reset({ item: values.item, bandMaxLiters: values.bandMaxLiters, effectiveFrom: data.today, note: '' });
  };
  return (
    <FormFrame
      {...frame(send, add.isPending)}
      submitLabel="Schedule the price"
      panel
      intro={
        <>
          <h3 className="text-sm font-semibold">Change a price</h3>
          <p className="text-sm text-ink-muted">
            A new price applies from its date on; what was used before that date keeps the old price. It cannot be back-dated.
          </p>
        </>
      }
    >
      <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-5">
        <ChoiceField form={form} name="item" label="Item" className="lg:col-span-2">
          <OptionList values={priceItems} labels={(i) => `${priceItemInfo[i].label} (per ${priceItemInfo[i].unit})`} />
        </ChoiceField>
        {item === 'fermenter_day' ? <NumberField form={form} name="bandMaxLiters" label="Capacity band, up to" hint="Litres" inputMode="numeric" /> : null}
        <MoneyField form={form} name="unitCents" label="Price" hint={`In ${data.currency}`} />
        <TextField form={form} name="effectiveFrom" label="From" type="date" min={data.today} />
      </div>
      <TextField form={form} name="note" label="Note" hint="Optional: where it was agreed." autoComplete="off" />
    </FormFrame>
  );
};

/** A percentage as typed ("7,7", "20 %") to basis points; empty or not a number is NaN, which the schema refuses. */
const asBasisPoints = { setValueAs: (v: string) => Math.round((parseDecimal(String(v).replace('%', '')) ?? Number.NaN) * 100) };

/** Tax rates in basis points on the wire; a percentage in the form. */
const TaxRates = ({ data }: { data: PriceListResponse }) => {
  const add = useAddTaxRate();
  const withdraw = useWithdrawTaxRate();
  const { form, frame } = useApiForm<TaxRateInput>(taxRateInputSchema, {
    defaultValues: { label: data.taxRates[0]?.label ?? 'VAT', effectiveFrom: data.today },
    fields: ['rateBp', 'label', 'effectiveFrom'],
  });
  const send = (values: TaxRateInput) => add.mutateAsync(values).then(() => form.reset({ label: values.label, effectiveFrom: data.today }));
  return (
    <div className="flex flex-col gap-3">
      <ul className="divide-y divide-line rounded-md border border-line bg-surface text-sm">
        {data.taxRates.length === 0 ? <li className="px-3 py-2 text-ink-muted">No tax rate: invoices carry no tax.</li> : null}
        {data.taxRates.map((t) => (
          <li key={t.id} className="flex flex-wrap items-center justify-between gap-2 px-3 py-2">
            <span>
              {t.label} {formatRate(t.rateBp)} from {longDate(t.effectiveFrom)}
            </span>
            <span className="flex items-center gap-2">
              {t.current ? (
                <Badge tone="ready">In effect</Badge>
              ) : t.effectiveFrom > data.today ? (
                <Badge tone="copper">Scheduled</Badge>
              ) : (
                <Badge tone="muted">Before</Badge>
              )}
              {t.effectiveFrom > data.today ? (
                <Button size="sm" variant="ghost" onClick={() => withdraw.mutate(t.id)} pending={withdraw.isPending && withdraw.variables === t.id}>
                  Withdraw
                </Button>
              ) : null}
            </span>
          </li>
        ))}
      </ul>
      <FormFrame
        {...frame(send, add.isPending)}
        submitLabel="Schedule the rate"
        submitVariant="secondary"
        actions="inline"
        className="flex flex-wrap items-end gap-3"
      >
        <TextField
          form={form}
          name="rateBp"
          label="New rate"
          hint="Per cent; zero is allowed"
          inputMode="decimal"
          inputClassName="w-28"
          options={asBasisPoints}
        />
        <TextField form={form} name="label" label="Label" inputClassName="w-32" />
        <TextField form={form} name="effectiveFrom" label="From" type="date" min={data.today} />
      </FormFrame>
    </div>
  );
};

export const PriceListEditor = ({ data }: { data: PriceListResponse }) => (
  <div className="flex flex-col gap-6">
    <section aria-labelledby="prices-title" className="flex flex-col gap-3">
      <h2 id="prices-title" className="text-base">
        Prices, in {data.currency}, before tax
      </h2>
      <PriceTable data={data} />
      <AddPriceForm data={data} />
    </section>
    <section aria-labelledby="tax-title" className="flex max-w-3xl flex-col gap-3">
      <h2 id="tax-title" className="text-base">
        Tax rate
      </h2>
      <p className="text-sm text-ink-muted">Each line is taxed at the rate in effect on its first day of use.</p>
      <TaxRates data={data} />
    </section>
  </div>
);
