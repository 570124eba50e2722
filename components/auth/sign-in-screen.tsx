import { zodResolver } from '@hookform/resolvers/zod';
import { Redirect } from 'expo-router';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { signInBodySchema } from '@/shared/api/auth';
import { ApiError, errorMessage } from '@/hooks/api-client';
import { isSignedOut, useMeQuery, useSignInMutation } from '@/hooks/use-auth';
import { Button } from '../button';
import { FormTextField } from '../forms/form-fields';
import { Notice } from '../state-views';
import { TextLink } from '../text-link';
import { space } from '../theme';
import { AuthFrame } from './auth-frame';

/** Only same-app paths, so a crafted link cannot send someone elsewhere after sign-in. */
export function safeNext(next: string | string[] | undefined): string {
  const n = Array.isArray(next) ? next[0] : next;
  return n && n.startsWith('/') && !n.startsWith('//') && !n.startsWith('/sign-in') ? n : '/';
}

export function SignInScreen({ next }: { next?: string }) {
  // Cache only: asking the server here would just log a 401 for everyone signed out.
  const me = useMeQuery({ enabled: false });
  const signIn = useSignInMutation();
  const [formError, setFormError] = useState<string | null>(null);
  const form = useForm({
    resolver: zodResolver(signInBodySchema),
    defaultValues: { email: '', password: '' },
  });
  const onSubmit = form.handleSubmit((body) => {
    setFormError(null);
    // On success the /me cache holds the person, and the Redirect below takes them on.
    signIn.mutate(body, {
      onError: (err) => {
        // The server never says which of the two was wrong, and neither do we.
        setFormError(err instanceof ApiError && err.code === 'INVALID_CREDENTIALS' ? 'The e-mail or password is not right.' : errorMessage(err));
        form.setValue('password', '');
      },
    });
  });

  if (me.data && !isSignedOut(me.error)) return <Redirect href={safeNext(next) as '/'} />;

  return (
    <AuthFrame title="Sign in" intro="Use the e-mail address your invitation was sent to.">
      {formError ? <Notice kind="error">{formError}</Notice> : null}
      <FormTextField
        control={form.control}
        name="email"
        label="Email"
        autoComplete="email"
        textContentType="emailAddress"
        inputMode="email"
        keyboardType="email-address"
        autoCapitalize="none"
        autoCorrect={false}
        returnKeyType="go"
        onSubmitEditing={() => void onSubmit()}
        testID="sign-in-email"
      />
      <FormTextField
        control={form.control}
        name="password"
        label="Password"
        secureTextEntry
        autoComplete="current-password"
        textContentType="password"
        returnKeyType="go"
        onSubmitEditing={() => void onSubmit()}
        testID="sign-in-password"
      />
      <View style={styles.actions}>
        <Button title="Sign in" onPress={() => void onSubmit()} busy={signIn.isPending} testID="sign-in-submit" />
        <TextLink href="/reset-password" small>
          Forgot your password?
        </TextLink>
      </View>
    </AuthFrame>
  );
}

const styles = StyleSheet.create({
  actions: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', flexWrap: 'wrap', gap: space.md, marginTop: space.sm },
});
