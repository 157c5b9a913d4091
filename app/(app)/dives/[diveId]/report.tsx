import { useLocalSearchParams } from 'expo-router';

import { ReportView } from '@/components/report/report-view';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { useDiveReport } from '@/hooks/reports';

export default function DiveReportScreen() {
  const { diveId } = useLocalSearchParams<{ diveId: string }>();
  const report = useDiveReport(diveId);
  const number = report.data?.dives[0]?.dive.number;
  return (
    <Screen>
      <ScreenHeader title={number ? `Dive ${number} · report` : 'Dive report'} back={`/dives/${diveId}`} backLabel="Dive" />
      <ScreenBody>
        {report.isError ? <ErrorState error={report.error} onRetry={() => void report.refetch()} /> : null}
        {report.data ? <ReportView report={report.data} /> : report.isError ? null : <LoadingState label="Making the report…" />}
      </ScreenBody>
    </Screen>
  );
}
