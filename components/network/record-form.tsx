import type { UseMutationResult } from '@tanstack/react-query';
import { useState, type ReactNode } from 'react';
import type { FieldValues, UseFormReturn } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { errorMessage } from '@/hooks/api-client';
import { Button } from '../button';
import { applyServerErrors } from '../forms/server-errors';
import { Panel } from '../layout';
import { Notice } from '../state-views';
import { Text } from '../text';
import { colors, radii, space } from '../theme';
import type { NetworkKindInfo } from './kinds';

export interface RecordFormProps<V extends FieldValues> {
  kind: NetworkKindInfo;
  /** The record being edited, or null to create one. */
  record: { id: number; name: string } | null;
  form: UseFormReturn<V, unknown, FieldValues>;
  /** Field names of the form, to place the server's 400 details next to them. */
  fields: readonly string[];
  create: UseMutationResult<unknown, Error, never>;
  update: UseMutationResult<unknown, Error, { id: number; body: never }>;
  remove: UseMutationResult<unknown, Error, number>;
  onDone: (message: string) => void;
  onCancel: () => void;
  /** The fields; `submit` is for Enter in a text field. */
  children: (submit: () => void) => ReactNode;
}

/**
 * The frame every network form shares: title, form-level message, fields, Create/Save, Cancel,
 * and Delete with an inline confirmation (no browser dialog). The body sent is the shared create
 * schema's output: complete for POST, and accepted as-is by PATCH.
 */
export function RecordForm<V extends FieldValues>({ kind, record, form, fields, create, update, remove, onDone, onCancel, children }: RecordFormProps<V>) {
  const [formError, setFormError] = useState<string | null>(null);
  const [confirming, setConfirming] = useState(false);
  const busy = create.isPending || update.isPending;

  const submit = form.handleSubmit((body) => {
    setFormError(null);
    const name = String((body as { name?: unknown }).name ?? '');
    const handlers = {
      onSuccess: () => onDone(`${capital(kind.singular)} “${name}” ${record ? 'saved' : 'created'}.`),
      onError: (err: Error) => setFormError(applyServerErrors(err, form.setError, fields)),
    };
    if (record) update.mutate({ id: record.id, body: body as never }, handlers);
    else create.mutate(body as never, handlers);
  });
  const runSubmit = () => void submit();

  const title = record ? `Edit ${kind.singular} “${record.name}”` : `New ${kind.singular}`;
  return (
    <Panel title={title} label={title} testID="network-form">
      {formError ? <Notice kind="error">{formError}</Notice> : null}
      {children(runSubmit)}
      <View style={styles.actions}>
        <Button title={record ? 'Save changes' : `Create ${kind.singular}`} onPress={runSubmit} busy={busy} />
        <Button title="Cancel" kind="secondary" onPress={onCancel} />
      </View>
      {record ? (
        <View style={styles.danger}>
          {confirming ? (
            <View role="alert" style={styles.confirm}>
              <Text variant="small">
                Delete {kind.singular} “{record.name}”? This cannot be undone. The server refuses if other records still use it.
              </Text>
              {remove.error ? <Notice kind="error">{errorMessage(remove.error)}</Notice> : null}
              <View style={styles.actions}>
                <Button
                  title="Yes, delete"
                  label={`Yes, delete ${kind.singular} ${record.name}`}
                  kind="danger"
                  busy={remove.isPending}
                  onPress={() => remove.mutate(record.id, { onSuccess: () => onDone(`${capital(kind.singular)} “${record.name}” deleted.`) })}
                />
                <Button title="Keep it" kind="secondary" onPress={() => { remove.reset(); setConfirming(false); }} />
              </View>
            </View>
          ) : (
            <Button title={`Delete ${kind.singular}`} kind="danger" compact onPress={() => setConfirming(true)} />
          )}
        </View>
      ) : null}
    </Panel>
  );
}

function capital(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}

const styles = StyleSheet.create({
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, marginTop: space.xs },
  danger: { marginTop: space.xl, paddingTop: space.lg, borderTopWidth: 1, borderTopColor: colors.rule },
  confirm: { gap: space.sm, padding: space.md, borderRadius: radii.md, backgroundColor: colors.dangerSoft },
});
