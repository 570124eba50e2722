import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { z } from 'zod';
import { PASSWORD_MIN } from '@/shared/api/common';
import { PASSWORD_RESET_TTL_MINUTES, passwordResetRequestBodySchema } from '@/shared/api/password-reset';
import { ApiError } from '@/hooks/api-client';
import { useCompletePasswordResetMutation, useRequestPasswordResetMutation } from '@/hooks/use-password-reset';
import { Button } from '../button';
import { FormTextField } from '../forms/form-fields';
import { applyServerErrors } from '../forms/server-errors';
import { Notice } from '../state-views';
import { Text } from '../text';
import { TextLink } from '../text-link';
import { space } from '../theme';
import { AuthFrame } from './auth-frame';
import { MISMATCH, passwordPairShape, passwordsMatch } from './password-fields';

/** /reset-password asks for a link; /reset-password?token=… sets the new password. */
export function ResetPasswordScreen({ token }: { token?: string }) {
  return token ? <CompleteReset token={token} /> : <RequestReset />;
}

function RequestReset() {
  const request = useRequestPasswordResetMutation();
  const [formError, setFormError] = useState<string | null>(null);
  const form = useForm({ resolver: zodResolver(passwordResetRequestBodySchema), defaultValues: { email: '' } });
  const onSubmit = form.handleSubmit((body) => {
    setFormError(null);
    request.mutate(body, { onError: (err) => setFormError(applyServerErrors(err, form.setError, ['email'])) });
  });

  return (
    <AuthFrame
      title="Reset password"
      intro={`We send a link to your e-mail address. It works once, for ${PASSWORD_RESET_TTL_MINUTES} minutes.`}
    >
      {request.isSuccess ? (
        <>
          {/* The same answer whether or not the address has an account. */}
          <Notice kind="ok">{request.data.message}</Notice>
          <TextLink href="/sign-in" small>
            Back to sign in
          </TextLink>
        </>
      ) : (
        <>
          {formError ? <Notice kind="error">{formError}</Notice> : null}
          <FormTextField
            control={form.control}
            name="email"
            label="Email"
            autoComplete="email"
            inputMode="email"
            keyboardType="email-address"
            autoCapitalize="none"
            autoCorrect={false}
            onSubmitEditing={() => void onSubmit()}
          />
          <View style={styles.actions}>
            <Button title="Send reset link" onPress={() => void onSubmit()} busy={request.isPending} />
            <TextLink href="/sign-in" small>
              Back to sign in
            </TextLink>
          </View>
        </>
      )}
    </AuthFrame>
  );
}

const completeFormSchema = z.object(passwordPairShape).refine(passwordsMatch, MISMATCH);

function CompleteReset({ token }: { token: string }) {
  const complete = useCompletePasswordResetMutation();
  const [formError, setFormError] = useState<string | null>(null);
  const [badLink, setBadLink] = useState(false);
  const form = useForm({ resolver: zodResolver(completeFormSchema), defaultValues: { password: '', repeat: '' } });
  const onSubmit = form.handleSubmit(({ password }) => {
    setFormError(null);
    setBadLink(false);
    complete.mutate(
      { token, password },
      {
        onError: (err) => {
          if (err instanceof ApiError && err.code === 'INVALID_TOKEN') {
            setBadLink(true);
            setFormError(
              `This reset link cannot be used: it may have been used already or be older than ${PASSWORD_RESET_TTL_MINUTES} minutes. Ask for a new one.`,
            );
          } else setFormError(applyServerErrors(err, form.setError, ['password']));
        },
      },
    );
  });

  if (complete.isSuccess) {
    return (
      <AuthFrame title="Password set">
        <Notice kind="ok">Your new password is set. Every earlier session has been signed out.</Notice>
        <TextLink href="/sign-in">Sign in with the new password</TextLink>
      </AuthFrame>
    );
  }

  return (
    <AuthFrame title="Set a new password" intro="Choose a new password for Keel.">
      {formError ? (
        <>
          <Notice kind="error">{formError}</Notice>
          {badLink ? (
            <View style={styles.again}>
              <TextLink href="/reset-password" small>
                Ask for a new link
              </TextLink>
            </View>
          ) : null}
        </>
      ) : null}
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
      <Button title="Set new password" onPress={() => void onSubmit()} busy={complete.isPending} />
      <Text variant="small" muted style={styles.note}>
        Setting a new password signs you out everywhere else.
      </Text>
    </AuthFrame>
  );
}

const styles = StyleSheet.create({
  actions: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', flexWrap: 'wrap', gap: space.md, marginTop: space.sm },
  again: { marginBottom: space.lg },
  note: { marginTop: space.md },
});
