import { Panel, Screen } from '../layout';
import { AnalysesList } from '../recordings/analyses-list';
import { TextLink } from '../text-link';

/** Scans or Fits: every analysis of the kind, newest first; each opens its own page. */
export function AnalysesScreen({ kind }: { kind: 'scan' | 'fit' }) {
  const scan = kind === 'scan';
  return (
    <Screen
      title={scan ? 'Scans' : 'Fits'}
      intro={
        scan
          ? 'Ambient scans: modes estimated in sliding windows over a recording.'
          : 'Ring-down fits: Prony and the matrix pencil fitted to the free response after an event.'
      }
      actions={<TextLink href="/recordings">Recordings</TextLink>}
    >
      <Panel>
        <AnalysesList kind={kind} showRecording limit={100} emptyMessage="Open a recording to start one." />
      </Panel>
    </Screen>
  );
}
