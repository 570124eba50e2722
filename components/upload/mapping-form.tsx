import { zodResolver } from '@hookform/resolvers/zod';
import { useMemo } from 'react';
import { Controller, useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { z } from 'zod';
import { MAPPING_IGNORE, uploadMappingSchema, type UploadMapping } from '@/shared/api/recordings';
import { Button } from '../button';
import { SelectField } from '../select-field';
import { Notice } from '../state-views';
import { Num, Text } from '../text';
import { space } from '../theme';

export interface MappingFormProps {
  /** Columns of the file that match no channel name. */
  columns: string[];
  /** Channel names of the network to choose from. */
  knownChannels: string[];
  busy?: boolean;
  onSubmit: (mapping: UploadMapping) => void;
  onCancel: () => void;
}

const IGNORE_LABEL = 'Leave this column out';

// Column names may hold dots ("GRY.ANG"), which react-hook-form reads as paths: the form keeps
// the choices as a list in column order instead of an object keyed by column.
function formSchema(columns: string[]) {
  return z
    .object({
      targets: z.array(z.string({ error: 'Choose a channel, or leave the column out' }).min(1, { error: 'Choose a channel, or leave the column out' })),
    })
    .superRefine((v, ctx) => {
      const seen = new Map<string, number>();
      v.targets.forEach((t, i) => {
        if (!t || t === MAPPING_IGNORE) return;
        const first = seen.get(t);
        if (first !== undefined) {
          ctx.addIssue({ code: 'custom', path: ['targets', i], message: `${t} is already chosen for column “${columns[first]}”` });
        } else seen.set(t, i);
      });
    });
}

/**
 * The column-to-channel step of an upload: every column the server did not recognise gets a
 * channel of the network or "leave out". The result is checked with the API's own mapping schema.
 */
export function MappingForm({ columns, knownChannels, busy, onSubmit, onCancel }: MappingFormProps) {
  const schema = useMemo(() => formSchema(columns), [columns]);
  const form = useForm<{ targets: string[] }>({
    resolver: zodResolver(schema),
    defaultValues: { targets: columns.map(() => '') },
  });
  const options = useMemo(
    () => [{ value: MAPPING_IGNORE, label: IGNORE_LABEL }, ...knownChannels.map((c) => ({ value: c, label: c }))],
    [knownChannels],
  );
  const submit = form.handleSubmit((v) => {
    const mapping: UploadMapping = {};
    columns.forEach((c, i) => {
      mapping[c] = v.targets[i];
    });
    const checked = uploadMappingSchema.safeParse(mapping);
    if (!checked.success) {
      form.setError('root', { type: 'schema', message: checked.error.issues[0]?.message ?? 'The mapping is not valid' });
      return;
    }
    onSubmit(checked.data);
  });
  return (
    <View style={styles.wrap} role="group" aria-label="Map the unknown columns">
      <Notice kind="info">
        {columns.length === 1
          ? 'One column of the file matches no channel of the network. Say which channel it is, or leave it out, and upload again.'
          : `${columns.length} columns of the file match no channel of the network. Say which channel each one is, or leave it out, and upload again.`}
      </Notice>
      {form.formState.errors.root?.message ? <Notice kind="error">{form.formState.errors.root.message}</Notice> : null}
      {columns.map((c, i) => (
        <View key={c} style={styles.row}>
          <Text variant="small" muted>
            Column in the file
          </Text>
          <Num bold style={styles.column}>
            {c}
          </Num>
          <Controller
            control={form.control}
            name={`targets.${i}`}
            render={({ field, fieldState }) => (
              <SelectField
                label="Channel"
                // The name a screen reader (and the tests) use says which column it is for.
                accessibleLabel={`Channel for column ${c}`}
                value={field.value}
                onChange={field.onChange}
                onBlur={field.onBlur}
                options={options}
                placeholder="Choose a channel…"
                error={fieldState.error?.message}
                testID={`mapping-${c}`}
              />
            )}
          />
        </View>
      ))}
      <View style={styles.buttons}>
        <Button title="Upload with this mapping" onPress={() => void submit()} busy={busy} />
        <Button title="Cancel" kind="quiet" onPress={onCancel} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
  row: { borderTopWidth: 1, borderTopColor: '#E6E1D7', paddingTop: space.sm },
  column: { marginBottom: space.xs },
  buttons: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
