import { zodResolver } from '@hookform/resolvers/zod';
import { router, type Href } from 'expo-router';
import { useEffect, useRef, useState } from 'react';
import { Controller, useForm, useWatch } from 'react-hook-form';
import { Pressable, StyleSheet, View } from 'react-native';
import { z } from 'zod';
import { fitCreateBodySchema, type FitCreateBody } from '@/shared/api/fits';
import type { RecordingDetail } from '@/shared/api/recordings';
import { ApiError, errorMessage } from '@/hooks/api-client';
import { useStartFitMutation } from '@/hooks/use-fits';
import { Button } from '../button';
import { FieldRow } from '../forms/field-row';
import { FormNumberField, FormTextField } from '../forms/form-fields';
import { Panel } from '../layout';
import { Notice } from '../state-views';
import { Text } from '../text';
import { colors, layout, radii, space } from '../theme';
import { epochOf, formatSeconds, formatUtcTime, isoOf } from '../recordings/units';

/**
 * The ring-down estimator's band default, Hz (modal/ringdown.ts DEFAULT_RINGDOWN_OPTIONS.bandHz).
 * Mirrored, not imported: that module pulls the whole estimator into the app bundle.
 */
export const FIT_DEFAULT_BAND: readonly [number, number] = [0.1, 2.0];

const formSchema = z
  .object({
    fromSeconds: z.number({ error: 'From must be a number of seconds' }).min(0, { error: 'From must not be before the recording starts' }),
    toSeconds: z.number({ error: 'To must be a number of seconds' }),
    order: z
      .string()
      .trim()
      .refine((s) => s === '' || s.toLowerCase() === 'auto' || /^\d+$/.test(s), { error: 'Order must be "auto" or a whole number' }),
    bandLow: z.number({ error: 'Lowest frequency must be a number of Hz' }).min(0, { error: 'Lowest frequency must not be negative' }),
    bandHigh: z.number({ error: 'Highest frequency must be a number of Hz' }),
    channels: z.array(z.string()).min(1, { error: 'Choose at least one channel' }),
  })
  .superRefine((v, ctx) => {
    if (v.bandHigh <= v.bandLow) ctx.addIssue({ code: 'custom', path: ['bandHigh'], message: 'Highest frequency must be above the lowest' });
  });
type FitForm = z.infer<typeof formSchema>;

// API field → form field, for the shared schema's and the server's messages.
const FIELD_OF: Record<string, keyof FitForm> = { from: 'fromSeconds', to: 'toSeconds', order: 'order', bandHz: 'bandHigh', channels: 'channels' };

const round = (v: number, rate: number) => Math.round(v * rate) / rate;
const two = (v: number) => Math.round(v * 100) / 100;

export interface FitFormProps {
  recording: RecordingDetail;
  /** The interval, epoch seconds (from a brushed selection); the fields follow it. */
  interval: [number, number] | null;
  /** Typed values, epoch seconds, so the chart's selection band follows the fields. */
  onInterval: (from: number, to: number) => void;
  /** Start from these (a refit keeps the fit's channels and order). */
  initial?: { channels?: string[]; order?: FitCreateBody['order']; bandHz?: [number, number] };
  title?: string;
  submitTitle?: string;
  intro?: string;
  /** A line above the fields (e.g. where a suggested interval came from). */
  notice?: string | null;
  testID?: string;
}

/** A ring-down fit over an interval: Prony and the matrix pencil together, compared side by side. */
export function FitFormPanel({ recording, interval, onInterval, initial, title = 'Ring-down fit', submitTitle = 'Fit this interval', intro, notice, testID = 'fit-form' }: FitFormProps) {
  const start = epochOf(recording.startTime);
  const end = epochOf(recording.endTime);
  const rate = recording.rate ?? 30;
  const all = recording.channels.map((c) => c.name);
  const fit = useStartFitMutation();
  const [formError, setFormError] = useState<string | null>(null);
  const form = useForm<FitForm>({
    resolver: zodResolver(formSchema),
    defaultValues: {
      fromSeconds: interval ? two(interval[0] - start) : undefined,
      toSeconds: interval ? two(interval[1] - start) : undefined,
      order: initial?.order === undefined || initial.order === 'auto' ? 'auto' : String(initial.order),
      bandLow: initial?.bandHz?.[0] ?? FIT_DEFAULT_BAND[0],
      bandHigh: initial?.bandHz?.[1] ?? FIT_DEFAULT_BAND[1],
      channels: initial?.channels?.length ? initial.channels.filter((c) => all.includes(c)) : all,
    },
  });

  // A brushed selection fills the fields (on the sample grid). What came from it is remembered,
  // so that the fields do not hand the rounded values back as a choice of their own.
  const fromProp = useRef<[number, number] | null>(interval ? [two(interval[0] - start), two(interval[1] - start)] : null);
  useEffect(() => {
    if (!interval) return;
    const f = two(round(interval[0] - start, rate));
    const t = two(round(interval[1] - start, rate));
    fromProp.current = [f, t];
    const cur = form.getValues();
    if (cur.fromSeconds !== f) form.setValue('fromSeconds', f, { shouldValidate: form.formState.isSubmitted });
    if (cur.toSeconds !== t) form.setValue('toSeconds', t, { shouldValidate: form.formState.isSubmitted });
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [interval?.[0], interval?.[1]]);

  // Typed values move the selection on the chart.
  const [fromS, toS] = useWatch({ control: form.control, name: ['fromSeconds', 'toSeconds'] });
  useEffect(() => {
    if (typeof fromS !== 'number' || typeof toS !== 'number' || !Number.isFinite(fromS) || !Number.isFinite(toS) || toS <= fromS) return;
    if (fromProp.current && fromProp.current[0] === fromS && fromProp.current[1] === toS) return;
    const a = start + fromS;
    const b = start + toS;
    if (!interval || Math.abs(interval[0] - a) > 1e-3 || Math.abs(interval[1] - b) > 1e-3) onInterval(a, b);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [fromS, toS]);

  const onSubmit = form.handleSubmit((v) => {
    setFormError(null);
    const changedBand = v.bandLow !== FIT_DEFAULT_BAND[0] || v.bandHigh !== FIT_DEFAULT_BAND[1];
    const order = v.order === '' || v.order.toLowerCase() === 'auto' ? 'auto' : Number(v.order);
    const body: FitCreateBody = {
      from: isoOf(start + v.fromSeconds),
      to: isoOf(start + v.toSeconds),
      order,
      ...(v.channels.length < all.length ? { channels: v.channels } : {}),
      ...(changedBand ? { bandHz: [v.bandLow, v.bandHigh] as [number, number] } : {}),
    };
    // The API's own schema (interval 2–600 s, order 1–200) has the last word before sending.
    const checked = fitCreateBodySchema.safeParse(body);
    if (!checked.success) {
      for (const issue of checked.error.issues) {
        const f = FIELD_OF[String(issue.path[0])];
        if (f) form.setError(f, { type: 'schema', message: issue.message });
        else setFormError(issue.message);
      }
      return;
    }
    if (start + v.toSeconds > end + 0.5 / rate) {
      form.setError('toSeconds', { type: 'range', message: `To must be within the recording (it lasts ${formatSeconds(end - start)})` });
      return;
    }
    fit.mutate(
      { recordingId: recording.id, body },
      {
        onSuccess: (res) => router.push(`/fits/${res.analysis.id}` as Href),
        onError: (err) => {
          // Field details beside their fields; the server's whole message on top, word for word.
          if (err instanceof ApiError) {
            for (const d of err.details) {
              const f = FIELD_OF[d.path.split('.')[0]];
              if (f) form.setError(f, { type: 'server', message: d.message });
            }
          }
          setFormError(errorMessage(err));
        },
      },
    );
  });

  const fromHint = typeof fromS === 'number' && Number.isFinite(fromS) ? formatUtcTime(start + fromS) : 'seconds after the recording starts';
  const toHint =
    typeof toS === 'number' && Number.isFinite(toS)
      ? `${formatUtcTime(start + toS)}${typeof fromS === 'number' && toS > fromS ? ` · ${formatSeconds(toS - fromS)} long` : ''}`
      : 'seconds after the recording starts';

  return (
    <Panel title={title} label={title} testID={testID}>
      <Text variant="small" muted style={styles.intro}>
        {intro ??
          'Prony and the matrix pencil fitted to the same interval, 2–600 s long, starting just after the event. Drag across the signal to select it, or type it here.'}
      </Text>
      {notice ? <Notice kind="info">{notice}</Notice> : null}
      {formError ? <Notice kind="error">{formError}</Notice> : null}
      <FieldRow>
        <FormNumberField control={form.control} name="fromSeconds" label="From" unit="s" hint={fromHint} />
        <FormNumberField control={form.control} name="toSeconds" label="To" unit="s" hint={toHint} />
      </FieldRow>
      <FieldRow>
        <FormNumberField control={form.control} name="bandLow" label="Lowest frequency" unit="Hz" hint={`default ${FIT_DEFAULT_BAND[0].toFixed(1)} Hz`} />
        <FormNumberField control={form.control} name="bandHigh" label="Highest frequency" unit="Hz" hint={`default ${FIT_DEFAULT_BAND[1].toFixed(1)} Hz`} />
      </FieldRow>
      <FormTextField control={form.control} name="order" label="Model order" hint="auto (default): chosen from the data; or a whole number 1–200" autoCapitalize="none" />
      <Controller
        control={form.control}
        name="channels"
        render={({ field, fieldState }) => (
          <ChannelChips all={all} value={field.value} onChange={field.onChange} error={fieldState.error?.message} />
        )}
      />
      <Button title={submitTitle} onPress={() => void onSubmit()} busy={fit.isPending} disabled={recording.status !== 'ready'} testID="fit-start" />
    </Panel>
  );
}

function ChannelChips({ all, value, onChange, error }: { all: string[]; value: string[]; onChange: (v: string[]) => void; error?: string }) {
  const allOn = value.length === all.length;
  return (
    <View style={styles.chipsWrap}>
      <View style={styles.chipsHead}>
        <Text variant="small" bold>
          {`Channels (${value.length} of ${all.length})`}
        </Text>
        <Pressable role="button" onPress={() => onChange(allOn ? [] : all)} style={styles.allButton} aria-label={allOn ? 'Clear every channel' : 'Choose every channel'}>
          <Text variant="small" bold color={colors.accent}>
            {allOn ? 'Clear' : 'All'}
          </Text>
        </Pressable>
      </View>
      <View role="group" aria-label="Channels to fit" style={styles.chips}>
        {all.map((c) => {
          const on = value.includes(c);
          return (
            <Pressable
              key={c}
              role="checkbox"
              aria-checked={on}
              aria-label={`Fit channel ${c}`}
              onPress={() => onChange(on ? value.filter((x) => x !== c) : all.filter((x) => x === c || value.includes(x)))}
              style={[styles.chip, on && styles.chipOn]}
            >
              <Text variant="caption" mono bold={on} color={on ? colors.accent : colors.ink}>
                {on ? `✓ ${c}` : c}
              </Text>
            </Pressable>
          );
        })}
      </View>
      {error ? (
        <Text variant="small" color={colors.danger} role="alert">
          {error}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  intro: { marginBottom: space.md },
  chipsWrap: { marginBottom: space.lg, gap: space.xs },
  chipsHead: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between' },
  allButton: { minHeight: 32, paddingHorizontal: space.sm, justifyContent: 'center', borderRadius: radii.sm },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs },
  chip: {
    minHeight: 34,
    minWidth: layout.hitTarget,
    paddingHorizontal: space.sm,
    justifyContent: 'center',
    borderWidth: 1.5,
    borderColor: colors.rule,
    borderRadius: radii.pill,
    backgroundColor: '#FFFFFF',
  },
  chipOn: { borderColor: colors.accent, backgroundColor: colors.accentSoft },
});
