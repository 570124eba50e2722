import { zodResolver } from '@hookform/resolvers/zod';
import { router, type Href } from 'expo-router';
import { useMemo, useState } from 'react';
import { Controller, useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { z } from 'zod';
import type { RecordingDetail } from '@/shared/api/recordings';
import { scanSettingsSchema, type ScanSettings } from '@/shared/api/scans';
import { useStartScanMutation } from '@/hooks/use-scans';
import { Button } from '../button';
import { FieldRow } from '../forms/field-row';
import { FormNumberField } from '../forms/form-fields';
import { applyServerErrors } from '../forms/server-errors';
import { Panel } from '../layout';
import { SelectField } from '../select-field';
import { Notice } from '../state-views';
import { Text } from '../text';
import { space } from '../theme';
import { epochOf, formatDuration } from '../recordings/units';
import { Toggle } from '../fits/toggle';

/**
 * The ambient estimator's defaults (modal/ambient-options.ts DEFAULT_AMBIENT_OPTIONS), shown in
 * the form. Mirrored rather than imported to keep the estimator's module out of the app bundle;
 * only the settings a person changes are sent, so the server applies its own defaults to the rest.
 */
const D = {
  windowSeconds: 1200,
  stepSeconds: 60,
  bandHz: [0.1, 2.0] as const,
  method: 'yule-walker' as const,
  arOrder: 30,
  forced: { enabled: true },
};
const shape = scanSettingsSchema.shape;

const METHOD_OPTIONS = [
  { value: 'yule-walker', label: 'Yule-Walker (autoregressive)' },
  { value: 'acf-matrix-pencil', label: 'Matrix pencil on autocorrelations' },
];

// The form's fields are the shared schema's own (same messages as the server's check); the band
// is two fields here and one [low, high] pair in the API.
function formSchema(durationSeconds: number) {
  return z
    .object({
      windowSeconds: shape.windowSeconds.unwrap(),
      stepSeconds: shape.stepSeconds.unwrap(),
      bandLow: z.number({ error: 'Lowest frequency must be a number of Hz' }).min(0, { error: 'Lowest frequency must not be negative' }),
      bandHigh: z.number({ error: 'Highest frequency must be a number of Hz' }).positive({ error: 'Highest frequency must be positive' }),
      method: shape.method.unwrap(),
      arOrder: shape.arOrder.unwrap(),
      forcedEnabled: z.boolean(),
    })
    .superRefine((v, ctx) => {
      if (v.bandHigh <= v.bandLow) ctx.addIssue({ code: 'custom', path: ['bandHigh'], message: 'Highest frequency must be above the lowest' });
      if (Number.isFinite(durationSeconds) && v.windowSeconds > durationSeconds + 1e-6) {
        ctx.addIssue({ code: 'custom', path: ['windowSeconds'], message: `The recording lasts ${formatDuration(durationSeconds)}: the window must not be longer` });
      }
    });
}
type ScanForm = z.infer<ReturnType<typeof formSchema>>;

const FIELDS = ['windowSeconds', 'stepSeconds', 'bandHigh', 'method', 'arOrder'] as const;

/** Start an ambient scan: the estimator's main settings with its defaults filled in and named. */
export function ScanFormPanel({ recording }: { recording: RecordingDetail }) {
  const duration = epochOf(recording.endTime) - epochOf(recording.startTime);
  const schema = useMemo(() => formSchema(duration), [duration]);
  const start = useStartScanMutation();
  const [formError, setFormError] = useState<string | null>(null);
  const form = useForm<ScanForm>({
    resolver: zodResolver(schema),
    defaultValues: {
      windowSeconds: D.windowSeconds,
      stepSeconds: D.stepSeconds,
      bandLow: D.bandHz[0],
      bandHigh: D.bandHz[1],
      method: D.method,
      arOrder: D.arOrder,
      forcedEnabled: D.forced.enabled,
    },
  });
  const onSubmit = form.handleSubmit((v) => {
    setFormError(null);
    const settings: ScanSettings = {
      ...(v.windowSeconds !== D.windowSeconds ? { windowSeconds: v.windowSeconds } : {}),
      ...(v.stepSeconds !== D.stepSeconds ? { stepSeconds: v.stepSeconds } : {}),
      ...(v.bandLow !== D.bandHz[0] || v.bandHigh !== D.bandHz[1] ? { bandHz: [v.bandLow, v.bandHigh] as [number, number] } : {}),
      ...(v.method !== D.method ? { method: v.method } : {}),
      ...(v.arOrder !== D.arOrder ? { arOrder: v.arOrder } : {}),
      ...(v.forcedEnabled !== D.forced.enabled ? { forced: { enabled: v.forcedEnabled } } : {}),
    };
    // The API's own schema has the last word before anything is sent.
    const checked = scanSettingsSchema.safeParse(settings);
    if (!checked.success) {
      setFormError(checked.error.issues.map((i) => i.message).join('; '));
      return;
    }
    start.mutate(
      { recordingId: recording.id, body: { settings: checked.data } },
      {
        onSuccess: (res) => router.push(`/scans/${res.analysis.id}` as Href),
        onError: (err) => setFormError(applyServerErrors(err, form.setError, FIELDS)),
      },
    );
  });

  const short = Number.isFinite(duration) && duration < D.windowSeconds;
  return (
    <Panel title="Ambient scan" label="Start an ambient scan" testID="scan-form">
      <Text variant="small" muted style={styles.intro}>
        Modes estimated in sliding windows from the ambient response. The values below are the estimator’s defaults.
      </Text>
      {short ? (
        <Notice kind="info">{`This recording lasts ${formatDuration(duration)}, less than the default ${D.windowSeconds / 60}-minute window: shorten the window, or fit a ring-down instead.`}</Notice>
      ) : null}
      {formError ? <Notice kind="error">{formError}</Notice> : null}
      <FieldRow>
        <FormNumberField control={form.control} name="windowSeconds" label="Window" unit="s" hint={`default ${D.windowSeconds} s (${D.windowSeconds / 60} min)`} />
        <FormNumberField control={form.control} name="stepSeconds" label="Step" unit="s" hint={`default ${D.stepSeconds} s`} />
      </FieldRow>
      <FieldRow>
        <FormNumberField control={form.control} name="bandLow" label="Lowest frequency" unit="Hz" hint={`default ${D.bandHz[0].toFixed(1)} Hz`} />
        <FormNumberField control={form.control} name="bandHigh" label="Highest frequency" unit="Hz" hint={`default ${D.bandHz[1].toFixed(1)} Hz`} />
      </FieldRow>
      <FieldRow>
        <Controller
          control={form.control}
          name="method"
          render={({ field, fieldState }) => (
            <SelectField label="Method" value={field.value} onChange={field.onChange} onBlur={field.onBlur} options={METHOD_OPTIONS} error={fieldState.error?.message} />
          )}
        />
        <FormNumberField control={form.control} name="arOrder" label="Model order" hint={`default ${D.arOrder}`} />
      </FieldRow>
      <Controller
        control={form.control}
        name="forcedEnabled"
        render={({ field }) => (
          <Toggle
            value={field.value}
            onChange={field.onChange}
            label="Look for forced oscillations"
            hint="A sustained sinusoid is marked ∿ forced rather than counted as a poorly damped mode (default on)."
          />
        )}
      />
      <Button title="Start the scan" label="Start the ambient scan" onPress={() => void onSubmit()} busy={start.isPending} disabled={recording.status !== 'ready'} testID="scan-start" />
    </Panel>
  );
}

const styles = StyleSheet.create({
  intro: { marginBottom: space.md },
});
