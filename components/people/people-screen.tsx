import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import type { Person } from '@/shared/api/auth';
import { invitationCreateBodySchema, type Invitation } from '@/shared/api/invitations';
import { ROLE_LABELS, ROLES, type Role } from '@/shared/roles';
import { errorMessage } from '@/hooks/api-client';
import { useCan, useMeQuery } from '@/hooks/use-auth';
import { useBreakpoint } from '@/hooks/use-breakpoint';
import { useCreateInvitationMutation, useInvitationsQuery, useRevokeInvitationMutation } from '@/hooks/use-invitations';
import { usePeopleQuery, useUpdatePersonMutation } from '@/hooks/use-people';
import { Button } from '../button';
import { formatDateTime } from '../format';
import { FormSelectField, FormTextField } from '../forms/form-fields';
import { applyServerErrors } from '../forms/server-errors';
import { Columns, Panel, Screen } from '../layout';
import { SelectField } from '../select-field';
import { EmptyState, ErrorState, LoadingState, Notice } from '../state-views';
import { Text } from '../text';
import { TextLink } from '../text-link';
import { colors, radii, space } from '../theme';

const roleOptions = ROLES.map((r) => ({ value: r, label: ROLE_LABELS[r] }));

/** People (administrators): who has an account, their roles, and invitations. */
export function PeopleScreen() {
  const can = useCan();
  const bp = useBreakpoint();
  if (!can('managePeople')) {
    return (
      <Screen title="People">
        <ErrorState title="Administrators only" message="Inviting people and changing roles is for administrators." />
      </Screen>
    );
  }
  return (
    <Screen title="People" intro="Invite people by e-mail, set their roles, and disable accounts that should no longer sign in.">
      {bp.isWide ? (
        <Columns max={2} weights={[3, 2]}>
          <PeopleList />
          <View style={styles.side}>
            <InvitePanel />
            <InvitationsPanel />
          </View>
        </Columns>
      ) : (
        // Phones: the action first, then who is here, then the invitations.
        <View style={styles.side}>
          <InvitePanel />
          <PeopleList />
          <InvitationsPanel />
        </View>
      )}
    </Screen>
  );
}

function PeopleList() {
  const people = usePeopleQuery();
  return (
    <Panel title="People" label="People">
      {people.isPending ? (
        <LoadingState label="Loading people…" />
      ) : people.error ? (
        <ErrorState title="Could not load people" message={errorMessage(people.error)} onRetry={() => void people.refetch()} />
      ) : people.data.people.length === 0 ? (
        <EmptyState title="Nobody has an account yet" message="Invite someone with the invitation form." />
      ) : (
        <View role="list" aria-label="People" style={styles.list}>
          {[...people.data.people]
            .sort((a, b) => Number(a.disabled) - Number(b.disabled) || a.displayName.localeCompare(b.displayName))
            .map((p) => (
              <PersonRow key={p.id} person={p} />
            ))}
        </View>
      )}
    </Panel>
  );
}

function PersonRow({ person }: { person: Person }) {
  const me = useMeQuery().data;
  const isMe = me?.person.id === person.id;
  const update = useUpdatePersonMutation();
  const [role, setRole] = useState<Role>(person.role);
  const [message, setMessage] = useState<{ kind: 'ok' | 'error'; text: string } | null>(null);
  const changed = role !== person.role;

  const run = (body: { role?: Role; disabled?: boolean }, done: string) => {
    setMessage(null);
    update.mutate(
      { id: person.id, ...body },
      {
        onSuccess: () => setMessage({ kind: 'ok', text: done }),
        onError: (err) => setMessage({ kind: 'error', text: errorMessage(err) }),
      },
    );
  };

  return (
    <View role="listitem" style={[styles.person, person.disabled && styles.personDisabled]} testID={`person-${person.email}`}>
      <View style={styles.personHead}>
        <View style={styles.personName}>
          <Text bold>
            {person.displayName}
            {isMe ? <Text variant="small" muted>{'  (you)'}</Text> : null}
          </Text>
          <Text variant="small" mono muted numberOfLines={1}>
            {person.email}
          </Text>
        </View>
        {person.disabled ? (
          <View style={styles.disabledTag}>
            <Text variant="caption" bold color={colors.danger}>
              Disabled
            </Text>
          </View>
        ) : null}
      </View>
      <View style={styles.personControls}>
        <View style={styles.roleField}>
          <SelectField
            label="Role"
            accessibleLabel={`Role for ${person.displayName}`}
            value={role}
            options={roleOptions}
            onChange={(v) => setRole(v as Role)}
            disabled={isMe || update.isPending}
          />
        </View>
        <View style={styles.personButtons}>
          {changed ? (
            <Button
              title="Save role"
              label={`Save role for ${person.displayName}`}
              compact
              busy={update.isPending}
              onPress={() => run({ role }, `${person.displayName} is now ${ROLE_LABELS[role]}.`)}
            />
          ) : null}
          {isMe ? null : person.disabled ? (
            <Button
              title="Enable"
              label={`Enable ${person.displayName}`}
              kind="secondary"
              compact
              busy={update.isPending && !changed}
              onPress={() => run({ disabled: false }, `${person.displayName} can sign in again.`)}
            />
          ) : (
            <Button
              title="Disable"
              label={`Disable ${person.displayName}`}
              kind="danger"
              compact
              busy={update.isPending && !changed}
              onPress={() => run({ disabled: true }, `${person.displayName} is disabled and signed out.`)}
            />
          )}
        </View>
      </View>
      {message ? <Notice kind={message.kind}>{message.text}</Notice> : null}
    </View>
  );
}

function InvitePanel() {
  const create = useCreateInvitationMutation();
  const [formError, setFormError] = useState<string | null>(null);
  const [sent, setSent] = useState<{ email: string; role: Role } | null>(null);
  const form = useForm({
    resolver: zodResolver(invitationCreateBodySchema),
    defaultValues: { email: '', role: undefined as unknown as Role },
  });
  const onSubmit = form.handleSubmit((body) => {
    setFormError(null);
    setSent(null);
    create.mutate(body, {
      onSuccess: (res) => {
        setSent({ email: res.invitation.email, role: res.invitation.role });
        form.reset({ email: '', role: undefined as unknown as Role });
      },
      onError: (err) => setFormError(applyServerErrors(err, form.setError, ['email', 'role'])),
    });
  });
  return (
    <Panel title="Invite someone" label="Invite someone">
      {sent ? (
        <View style={styles.sent}>
          <Notice kind="ok">
            Invitation sent to {sent.email} as {ROLE_LABELS[sent.role]}. The message with the link is in the Outbox.
          </Notice>
          <TextLink href="/outbox" small>
            Open the Outbox
          </TextLink>
        </View>
      ) : null}
      {formError ? <Notice kind="error">{formError}</Notice> : null}
      <FormTextField
        control={form.control}
        name="email"
        label="Email"
        autoComplete="off"
        inputMode="email"
        keyboardType="email-address"
        autoCapitalize="none"
        autoCorrect={false}
        required
        onSubmitEditing={() => void onSubmit()}
      />
      <FormSelectField control={form.control} name="role" label="Role" required options={roleOptions} placeholder="Choose a role" />
      <Button title="Send invitation" onPress={() => void onSubmit()} busy={create.isPending} />
    </Panel>
  );
}

const STATUS_WORD: Record<Invitation['status'], string> = { pending: 'Pending', used: 'Accepted', expired: 'Expired', revoked: 'Revoked' };

function InvitationsPanel() {
  const invitations = useInvitationsQuery();
  const revoke = useRevokeInvitationMutation();
  return (
    <Panel title="Invitations" label="Invitations">
      {revoke.error ? <Notice kind="error">{errorMessage(revoke.error)}</Notice> : null}
      {invitations.isPending ? (
        <LoadingState label="Loading invitations…" />
      ) : invitations.error ? (
        <ErrorState title="Could not load invitations" message={errorMessage(invitations.error)} onRetry={() => void invitations.refetch()} />
      ) : invitations.data.invitations.length === 0 ? (
        <EmptyState title="No invitations yet" />
      ) : (
        <View role="list" aria-label="Invitations" style={styles.list}>
          {invitations.data.invitations.map((inv) => (
            <View key={inv.id} role="listitem" style={styles.invitation} testID={`invitation-${inv.email}`}>
              <View style={styles.invitationText}>
                <Text variant="small" mono numberOfLines={1}>
                  {inv.email}
                </Text>
                <Text variant="caption" muted>
                  {ROLE_LABELS[inv.role]} · {STATUS_WORD[inv.status]}
                  {inv.status === 'pending' ? ` · until ${formatDateTime(inv.expiresAt)}` : ''}
                </Text>
              </View>
              {inv.status === 'pending' ? (
                <Button
                  title="Revoke"
                  label={`Revoke invitation for ${inv.email}`}
                  kind="quiet"
                  compact
                  busy={revoke.isPending && revoke.variables === inv.id}
                  onPress={() => revoke.mutate(inv.id)}
                />
              ) : null}
            </View>
          ))}
        </View>
      )}
    </Panel>
  );
}

const styles = StyleSheet.create({
  side: { gap: space.lg },
  list: { gap: space.sm },
  person: { borderWidth: 1, borderColor: colors.rule, borderRadius: radii.md, padding: space.md, backgroundColor: '#FFFFFF' },
  personDisabled: { backgroundColor: colors.paper },
  personHead: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'flex-start', gap: space.sm },
  personName: { flexShrink: 1 },
  disabledTag: { borderWidth: 1, borderColor: colors.danger, borderRadius: radii.pill, paddingHorizontal: space.sm },
  personControls: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'flex-end', gap: space.md, marginTop: space.sm },
  roleField: { flexGrow: 1, flexBasis: 180, marginBottom: -space.lg },
  personButtons: { flexDirection: 'row', gap: space.sm, paddingBottom: 4 },
  sent: { marginBottom: space.lg },
  invitation: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: space.sm, paddingVertical: space.xs, borderBottomWidth: 1, borderBottomColor: colors.rule },
  invitationText: { flexShrink: 1 },
});
