import { Slot } from 'expo-router';
import { AuthGate } from '@/components/auth-gate';
import { AppShell } from '@/components/shell/app-shell';

export default function SignedInLayout() {
  return (
    <AuthGate>
      {(me) => (
        <AppShell me={me}>
          <Slot />
        </AppShell>
      )}
    </AuthGate>
  );
}
