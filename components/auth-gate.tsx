import { router, usePathname } from 'expo-router';
import { useEffect, type ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import type { MeResponse } from '@/shared/api/auth';
import { errorMessage } from '@/hooks/api-client';
import { isSignedOut, useMeQuery } from '@/hooks/use-auth';
import { ErrorState, LoadingState } from './state-views';
import { colors, space } from './theme';

/**
 * Shows its children only to a signed-in person. A 401 from /api/auth/me sends the browser to
 * the sign-in screen (remembering where it was going); other failures offer a retry.
 */
export function AuthGate({ children }: { children: (me: MeResponse) => ReactNode }) {
  const me = useMeQuery();
  const pathname = usePathname();
  // Signed out wins over a cached person: the session may have ended since that answer.
  const signedOut = isSignedOut(me.error);
  useEffect(() => {
    if (!signedOut) return;
    const next = pathname && pathname !== '/' ? pathname : undefined;
    router.replace(next ? `/sign-in?next=${encodeURIComponent(next)}` : '/sign-in');
  }, [signedOut, pathname]);

  if (signedOut) return <Centered><LoadingState label="Your session has ended. Opening sign-in…" /></Centered>;
  if (me.data) return <>{children(me.data)}</>;
  if (me.error) {
    return (
      <Centered>
        <ErrorState title="Could not check who is signed in" message={errorMessage(me.error)} onRetry={() => void me.refetch()} />
      </Centered>
    );
  }
  return (
    <Centered>
      <LoadingState label="Checking your session…" />
    </Centered>
  );
}

function Centered({ children }: { children: ReactNode }) {
  return <View style={styles.center}>{children}</View>;
}

const styles = StyleSheet.create({
  center: { flex: 1, justifyContent: 'center', alignItems: 'center', backgroundColor: colors.paper, padding: space.xl },
});
