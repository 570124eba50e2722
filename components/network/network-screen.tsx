import { Link, router, type Href } from 'expo-router';
import { useEffect } from 'react';
import { Pressable, ScrollView, StyleSheet, View } from 'react-native';
import { errorMessage } from '@/hooks/api-client';
import { useCan } from '@/hooks/use-auth';
import { useBreakpoint } from '@/hooks/use-breakpoint';
import { useNetworkQuery } from '@/hooks/use-network';
import { extraAria } from '../a11y';
import { Button } from '../button';
import { DataTable } from '../data-table';
import { clearFlash, flash, useFlash } from '../flash';
import { Columns, Screen } from '../layout';
import { EmptyState, ErrorState, LoadingState, Notice } from '../state-views';
import { Text } from '../text';
import { TextLink } from '../text-link';
import { colors, radii, space } from '../theme';
import { kindInfo, NETWORK_KINDS, newTitle, type NetworkKindInfo } from './kinds';
import { NetworkForm } from './network-forms';
import { columnsOf, rowName, rowsOf } from './network-lists';

export interface NetworkScreenProps {
  /** URL segment: areas, sites, pmus, channels, corridors, tracks. */
  kind: string | undefined;
  /** 'new', a record id, or undefined for the list alone. */
  editing?: string;
}

/**
 * Network: read-only lists for everyone; admins and engineers also create, edit and delete.
 * Wide screens show the list and the open form side by side; phones show one at a time.
 */
export function NetworkScreen({ kind: kindKey, editing }: NetworkScreenProps) {
  const kind = kindInfo(kindKey);
  const bp = useBreakpoint();
  const can = useCan();
  const mayEdit = can('editNetwork');
  const model = useNetworkQuery();
  const notice = useFlash(`network/${kindKey}`);

  // A message from the previous form stays until the person opens another form.
  useEffect(() => {
    if (editing) clearFlash();
  }, [editing]);

  if (!kind) {
    return (
      <Screen title="Network">
        <ErrorState title="No such part of the network" message={`“${kindKey}” is not one of areas, sites, PMUs, channels, corridors or mode tracks.`} />
      </Screen>
    );
  }

  const base = `/network/${kind.key}`;
  const goList = (message?: string) => {
    if (message) flash(`network/${kind.key}`, message);
    router.replace(base as Href);
  };

  const actions =
    mayEdit && editing !== 'new' ? (
      <Button title={newTitle(kind)} onPress={() => router.push(`${base}/new` as Href)} testID="network-new" />
    ) : null;

  let body: React.ReactNode;
  if (model.isPending) body = <LoadingState label="Loading the network…" />;
  else if (model.error) body = <ErrorState title="Could not load the network" message={errorMessage(model.error)} onRetry={() => void model.refetch()} />;
  else {
    const m = model.data;
    const rows = rowsOf(kind.key, m);
    const record = editing && editing !== 'new' ? (rows.find((r) => String(r.id) === editing) ?? null) : null;
    const formOpen = mayEdit && !!editing && (editing === 'new' || record != null);

    const form = formOpen ? (
      <NetworkForm key={`${kind.key}-${editing}`} kind={kind} record={record} model={m} onDone={goList} onCancel={() => goList()} />
    ) : editing && editing !== 'new' && !record ? (
      <ErrorState title={`No ${kind.singular} with id ${editing}`} message="It may have been deleted." />
    ) : editing && !mayEdit ? (
      <Notice kind="info">Only administrators and engineers change the network.</Notice>
    ) : null;

    const list =
      rows.length === 0 ? (
        <EmptyState
          title={`No ${kind.title.toLowerCase()} yet`}
          message={mayEdit ? `Add the first with “${newTitle(kind)}”.` : 'An administrator or engineer adds them.'}
        />
      ) : (
        <DataTable
          label={kind.title}
          testID={`network-list-${kind.key}`}
          rows={rows}
          columns={columnsOf(kind.key, m)}
          rowKey={(r) => r.id}
          // A table needs room: beside an open form only narrow tables fit, else rows become cards.
          mode={bp.isWide && (!form || (bp.name === 'xwide' && columnsOf(kind.key, m).length <= 5)) ? 'table' : 'cards'}
          action={
            mayEdit
              ? {
                  title: 'Edit',
                  label: (r) => `Edit ${kind.singular} ${rowName(r)}`,
                  onPress: (r) => router.push(`${base}/${r.id}` as Href),
                  isActive: (r) => String(r.id) === editing,
                }
              : undefined
          }
        />
      );

    if (form && !bp.isWide) {
      // Phones: the form alone, with a way back.
      body = (
        <View>
          <View style={styles.back}>
            <TextLink href={base as Href} small label={`Back to ${kind.title.toLowerCase()}`}>
              {`← Back to ${kind.title.toLowerCase()}`}
            </TextLink>
          </View>
          {form}
        </View>
      );
    } else if (form) {
      body = (
        <Columns max={2} weights={bp.name === 'xwide' ? [3, 2] : [1, 1]} stickyLast>
          {list}
          {form}
        </Columns>
      );
    } else {
      body = list;
    }
  }

  return (
    <Screen
      title="Network"
      intro={mayEdit ? 'Areas, sites, PMUs, channels, corridors and mode tracks. You can change them.' : 'Areas, sites, PMUs, channels, corridors and mode tracks (read only).'}
      actions={actions}
    >
      <KindTabs current={kind} counts={model.data ? countsOf(model.data) : undefined} />
      {notice && !editing ? <Notice kind="ok">{notice.text}</Notice> : null}
      {body}
    </Screen>
  );
}

function countsOf(m: NonNullable<ReturnType<typeof useNetworkQuery>['data']>): Record<string, number> {
  return { areas: m.areas.length, sites: m.sites.length, pmus: m.pmus.length, channels: m.channels.length, corridors: m.corridors.length, tracks: m.tracks.length };
}

/** The six kinds as links; a horizontal strip that scrolls on phones. */
function KindTabs({ current, counts }: { current: NetworkKindInfo; counts?: Record<string, number> }) {
  return (
    <ScrollView horizontal showsHorizontalScrollIndicator={false} style={styles.tabsScroll} contentContainerStyle={styles.tabs}>
      <View role="navigation" aria-label="Network records" style={styles.tabsInner}>
        {NETWORK_KINDS.map((k) => {
          const active = k.key === current.key;
          return (
            <Link key={k.key} href={`/network/${k.key}` as Href} asChild>
              <Pressable
                role="link"
                {...extraAria({ current: active ? 'page' : undefined })}
                testID={`network-kind-${k.key}`}
                style={StyleSheet.flatten([styles.tab, active && styles.tabActive])}
              >
                <Text variant="small" bold={active} color={active ? colors.onAccent : colors.ink}>
                  {k.title}
                </Text>
                {counts ? (
                  <Text aria-hidden variant="caption" mono color={active ? colors.onAccent : colors.inkMuted} style={styles.count}>
                    {counts[k.key]}
                  </Text>
                ) : null}
              </Pressable>
            </Link>
          );
        })}
      </View>
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  tabsScroll: { marginBottom: space.lg, flexGrow: 0 },
  tabs: { paddingBottom: space.xxs },
  tabsInner: { flexDirection: 'row', gap: space.xs },
  tab: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: space.xs,
    minHeight: 38,
    paddingHorizontal: space.md,
    borderRadius: radii.pill,
    borderWidth: 1,
    borderColor: colors.rule,
    backgroundColor: colors.surface,
  },
  tabActive: { backgroundColor: colors.accent, borderColor: colors.accent },
  count: { marginLeft: 2 },
  back: { marginBottom: space.md },
});
