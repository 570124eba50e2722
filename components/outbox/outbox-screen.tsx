import { Link, type Href } from 'expo-router';
import { useEffect, useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import type { OutboxSummary } from '@/shared/api/outbox';
import { errorMessage } from '@/hooks/api-client';
import { useCan } from '@/hooks/use-auth';
import { useBreakpoint } from '@/hooks/use-breakpoint';
import { useOutboxMessageQuery, useOutboxQuery } from '@/hooks/use-outbox';
import { extraAria } from '../a11y';
import { ExternalLink } from '../external-link';
import { formatDateTime } from '../format';
import { Columns, Panel, Screen } from '../layout';
import { EmptyState, ErrorState, LoadingState } from '../state-views';
import { Heading, Text } from '../text';
import { TextField } from '../text-field';
import { TextLink } from '../text-link';
import { colors, radii, space } from '../theme';
import { linkify, textOfHtml } from './linkify';

/** Outbox (administrators): every e-mail Keel sent, as the local mail sink received it. */
export function OutboxScreen({ openId }: { openId?: string }) {
  const can = useCan();
  const bp = useBreakpoint();
  const [filter, setFilter] = useState('');
  const [to, setTo] = useState('');
  // Query the server once typing pauses, not on every keystroke.
  useEffect(() => {
    const t = setTimeout(() => setTo(filter.trim()), 300);
    return () => clearTimeout(t);
  }, [filter]);
  const messages = useOutboxQuery(to || undefined, can('managePeople'));
  const id = openId != null ? Number(openId) : undefined;

  if (!can('managePeople')) {
    return (
      <Screen title="Outbox">
        <ErrorState title="Administrators only" message="The Outbox is for administrators." />
      </Screen>
    );
  }

  const list = (
    <Panel label="Messages">
      <TextField label="Filter by recipient" value={filter} onChangeText={setFilter} autoCapitalize="none" autoCorrect={false} inputMode="email" />
      {messages.isPending ? (
        <LoadingState label="Loading messages…" />
      ) : messages.error ? (
        <ErrorState title="Could not load the Outbox" message={errorMessage(messages.error)} onRetry={() => void messages.refetch()} />
      ) : messages.data.messages.length === 0 ? (
        <EmptyState
          title={to ? `No messages to “${to}”` : 'No messages yet'}
          message={to ? undefined : 'Invitations, password resets and alert e-mails appear here once sent.'}
        />
      ) : (
        <View role="list" aria-label="Messages" style={styles.list}>
          {messages.data.messages.map((m) => (
            <MessageLink key={m.id} m={m} active={m.id === id} />
          ))}
        </View>
      )}
    </Panel>
  );

  if (id == null && !bp.isWide) {
    return (
      <Screen title="Outbox" intro="Every e-mail Keel sent, newest first. Open one to read it.">
        {list}
      </Screen>
    );
  }

  const message =
    id == null ? (
      <EmptyState title="No message open" message="Choose a message from the list to read it here." />
    ) : (
      <MessageView id={id} />
    );
  return (
    <Screen title="Outbox" intro="Every e-mail Keel sent, newest first. Open one to read it.">
      {bp.isWide ? (
        <Columns max={2} weights={[2, 3]} stickyLast>
          {list}
          {message}
        </Columns>
      ) : (
        <View>
          <View style={styles.back}>
            <TextLink href="/outbox" small label="Back to all messages">
              ← Back to all messages
            </TextLink>
          </View>
          {message}
        </View>
      )}
    </Screen>
  );
}

function MessageLink({ m, active }: { m: OutboxSummary; active: boolean }) {
  return (
    <View role="listitem">
      <Link href={`/outbox/${m.id}` as Href} asChild>
        <Pressable
          role="link"
          aria-label={`${m.subject}, to ${m.to}`}
          {...extraAria({ current: active ? 'page' : undefined })}
          testID={`outbox-message-${m.id}`}
          style={StyleSheet.flatten([styles.item, active && styles.itemActive])}
        >
          <Text bold numberOfLines={2}>
            {m.subject || '(no subject)'}
          </Text>
          <Text variant="small" mono muted numberOfLines={1}>
            to {m.to}
          </Text>
          <Text variant="caption" mono muted>
            {formatDateTime(m.receivedAt)}
          </Text>
        </Pressable>
      </Link>
    </View>
  );
}

function MessageView({ id }: { id: number }) {
  const q = useOutboxMessageQuery(Number.isFinite(id) ? id : undefined);
  if (!Number.isFinite(id) || id <= 0) return <ErrorState title="No such message" />;
  if (q.isPending) return <LoadingState label="Opening the message…" />;
  if (q.error) return <ErrorState title="Could not open the message" message={errorMessage(q.error)} onRetry={() => void q.refetch()} />;
  const m = q.data.message;
  const body = m.text ?? (m.html ? textOfHtml(m.html) : '');
  return (
    <Panel testID="outbox-message" label="Message">
      <Heading level={2}>{m.subject || '(no subject)'}</Heading>
      <View style={styles.headers}>
        <Header label="From" value={m.from} />
        <Header label="To" value={m.to} />
        <Header label="Received" value={formatDateTime(m.receivedAt)} />
      </View>
      <View style={styles.body}>
        {body ? (
          <Text variant="small" mono style={styles.bodyText} testID="outbox-message-body">
            {linkify(body).map((r, i) =>
              r.kind === 'text' ? r.text : <ExternalLink key={i} href={r.href}>{r.href}</ExternalLink>,
            )}
          </Text>
        ) : (
          <Text muted>This message has no text.</Text>
        )}
      </View>
    </Panel>
  );
}

function Header({ label, value }: { label: string; value: string }) {
  return (
    <View style={styles.header}>
      <Text variant="small" muted style={styles.headerLabel}>
        {label}
      </Text>
      <Text variant="small" mono style={styles.headerValue}>
        {value}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.xs },
  item: { padding: space.md, borderRadius: radii.md, borderWidth: 1, borderColor: colors.rule, backgroundColor: '#FFFFFF', gap: 2 },
  itemActive: { borderColor: colors.accent, backgroundColor: colors.accentSoft },
  back: { marginBottom: space.md },
  headers: { marginTop: space.md, gap: space.xxs },
  header: { flexDirection: 'row', gap: space.sm },
  headerLabel: { width: 72 },
  headerValue: { flex: 1 },
  body: { marginTop: space.lg, paddingTop: space.lg, borderTopWidth: 1, borderTopColor: colors.rule },
  bodyText: { lineHeight: 21 },
});
