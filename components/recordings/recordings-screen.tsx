import { StyleSheet, View } from 'react-native';
import { errorMessage } from '@/hooks/api-client';
import { useAnalysisEvents } from '@/hooks/use-analyses';
import { useCan } from '@/hooks/use-auth';
import { useBreakpoint } from '@/hooks/use-breakpoint';
import { RECORDINGS_FETCH_LIMIT, useRecordingsQuery } from '@/hooks/use-recordings';
import { Columns, Panel, Screen } from '../layout';
import { EmptyState, ErrorState, LoadingState, Notice } from '../state-views';
import { space } from '../theme';
import { UploadPanel } from '../upload/upload-panel';
import { AnalysesList } from './analyses-list';
import { RecordingsTable, useRecordingPageSize } from './recordings-table';

/** Recordings: the uploaded PMU data, the upload itself, and the latest scans and fits. */
export function RecordingsScreen() {
  const bp = useBreakpoint();
  const can = useCan();
  const mayRun = can('runAnalysis');
  const list = useRecordingsQuery();
  const pageSize = useRecordingPageSize(bp.isWide);
  useAnalysisEvents();

  const recordings = (
    <Panel title="Uploaded recordings" label="Uploaded recordings">
      {list.isPending ? (
        <LoadingState label="Loading recordings…" />
      ) : list.error ? (
        <ErrorState title="Could not load the recordings" message={errorMessage(list.error)} onRetry={() => void list.refetch()} />
      ) : list.data.recordings.length === 0 ? (
        <EmptyState
          title="No recordings yet"
          message={mayRun ? 'Add the first one with “Choose a file…”: a CSV or COMTRADE recording of PMU data.' : 'An engineer or administrator uploads recordings.'}
        />
      ) : (
        <>
          {list.data.recordings.length >= RECORDINGS_FETCH_LIMIT ? (
            <Notice kind="info">{`Showing the newest ${RECORDINGS_FETCH_LIMIT} recordings.`}</Notice>
          ) : null}
          <RecordingsTable recordings={list.data.recordings} mode={bp.isWide ? 'table' : 'cards'} pageSize={pageSize} />
        </>
      )}
    </Panel>
  );

  const analyses = (
    <Panel title="Latest scans and fits" label="Latest scans and fits">
      <AnalysesList showRecording limit={8} emptyMessage="Open a recording to start an ambient scan or a ring-down fit." />
    </Panel>
  );

  return (
    <Screen
      title="Recordings"
      intro="Synchrophasor recordings in Keel. Open one to see its channels and data quality, and to start an ambient scan or a ring-down fit."
    >
      {bp.isWide ? (
        <Columns max={2} weights={[2, 1]}>
          {recordings}
          <View style={styles.side}>
            {mayRun ? <UploadPanel /> : null}
            {analyses}
          </View>
        </Columns>
      ) : (
        <View style={styles.side}>
          {mayRun ? <UploadPanel /> : null}
          {recordings}
          {analyses}
        </View>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  side: { gap: space.lg },
});
