import { zodResolver } from '@hookform/resolvers/zod';
import { Redirect } from 'expo-router';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { z } from 'zod';
import { displayNameSchema, PASSWORD_MIN } from '@/shared/api/common';
import { INVITATION_TTL_HOURS } from '@/shared/api/invitations';
import { ROLE_LABELS } from '@/shared/roles';
import { ApiError, errorMessage } from '@/hooks/api-client';
import { isSignedOut, useMeQuery, useSignInMutation } from '@/hooks/use-auth';
import { useAcceptInvitationMutation, useInvitationByTokenQuery } from '@/hooks/use-invitations';
import { Button } from '../button';
import { formatDateTime } from '../format';
import { FormTextField } from '../forms/form-fields';
import { applyServerErrors } from '../forms/server-errors';
import { ErrorState, LoadingState, Notice } from '../state-views';
import { Text } from '../text';
import { TextLink } from '../text-link';
import { colors, radii, space } from '../theme';
import { AuthFrame } from './auth-frame';
import { MISMATCH, passwordPairShape, passwordsMatch } from './password-fields';

const acceptFormSchema = z.object({ displayName: displayNameSchema, ...passwordPairShape }).refine(passwordsMatch, MISMATCH);

export function AcceptInviteScreen({ token }: { token?: string }) {
  const lookup = useInvitationByTokenQuery(token);
  const me = useMeQuery({ enabled: false });
  const accept = useAcceptInvitationMutation();
  const signIn = useSignInMutation();
  const [formError, setFormError] = useState<string | null>(null);
  const form = useForm({
    resolver: zodResolver(acceptFormSchema),
    defaultValues: { displayName: '', password: '', repeat: '' },
  });

  const onSubmit = form.handleSubmit(({ displayName, password }) => {
    if (!token || !lookup.data) return;
    setFormError(null);
    accept.mutate(
      { token, displayName, password },
      {
        // Straight in with the password just set; the /me cache then redirects to Watch.
        onSuccess: () =>
          signIn.mutate(
            { email: lookup.data.email, password },
            { onError: (err) => setFormError(`Your account is ready, but signing in failed: ${errorMessage(err)}`) },
          ),
        onError: (err) => setFormError(applyServerErrors(err, form.setError, ['displayName', 'password'])),
      },
    );
  });

  if (accept.isSuccess && me.data && !isSignedOut(me.error)) return <Redirect href="/" />;

  if (!token) {
    return (
      <AuthFrame title="Accept invitation">
        <ErrorState title="This link has no invitation in it" message="Open the link from your invitation e-mail exactly as it was sent." />
      </AuthFrame>
    );
  }
  if (lookup.isPending) {
    return (
      <AuthFrame title="Accept invitation">
        <LoadingState label="Checking your invitation…" />
      </AuthFrame>
    );
  }
  if (lookup.error) {
    const bad = lookup.error instanceof ApiError && (lookup.error.code === 'INVALID_TOKEN' || lookup.error.code === 'VALIDATION' || lookup.error.code === 'NOT_FOUND');
    return (
      <AuthFrame title="Accept invitation">
        <ErrorState
          title={bad ? 'This invitation cannot be used' : 'Could not check the invitation'}
          message={
            bad
              ? `It may have been used already, withdrawn, or be older than ${INVITATION_TTL_HOURS} hours. Ask an administrator to invite you again.`
              : errorMessage(lookup.error)
          }
          onRetry={bad ? undefined : () => void lookup.refetch()}
        />
        <View style={styles.foot}>
          <TextLink href="/sign-in" small>
            Go to sign in
          </TextLink>
        </View>
      </AuthFrame>
    );
  }

  const inv = lookup.data;
  const busy = accept.isPending || signIn.isPending;
  return (
    <AuthFrame title="Accept invitation" intro="Choose the name others will see and a password for Keel.">
      <View style={styles.invited} role="region" aria-label="Invitation">
        <Row label="Invited e-mail" value={inv.email} testID="invited-email" />
        <Row label="Role" value={ROLE_LABELS[inv.role]} testID="invited-role" />
        <Row label="Link valid until" value={formatDateTime(inv.expiresAt)} />
      </View>
      {formError ? <Notice kind="error">{formError}</Notice> : null}
      <FormTextField control={form.control} name="displayName" label="Display name" autoComplete="name" textContentType="name" onSubmitEditing={() => void onSubmit()} required />
      <FormTextField
        control={form.control}
        name="password"
        label="New password"
        secureTextEntry
        autoComplete="new-password"
        textContentType="newPassword"
        hint={`At least ${PASSWORD_MIN} characters.`}
        onSubmitEditing={() => void onSubmit()}
        required
      />
      <FormTextField
        control={form.control}
        name="repeat"
        label="Repeat new password"
        secureTextEntry
        autoComplete="new-password"
        textContentType="newPassword"
        onSubmitEditing={() => void onSubmit()}
        required
      />
      <Button title="Accept invitation" onPress={() => void onSubmit()} busy={busy} />
    </AuthFrame>
  );
}

function Row({ label, value, testID }: { label: string; value: string; testID?: string }) {
  return (
    <View style={styles.row}>
      <Text variant="small" muted style={styles.rowLabel}>
        {label}
      </Text>
      <Text bold testID={testID} style={styles.rowValue}>
        {value}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  invited: { backgroundColor: colors.accentSoft, borderRadius: radii.md, padding: space.md, marginBottom: space.lg, gap: space.xs },
  row: { flexDirection: 'row', gap: space.sm, alignItems: 'baseline' },
  rowLabel: { width: 112 },
  rowValue: { flexShrink: 1 },
  foot: { marginTop: space.lg },
});
