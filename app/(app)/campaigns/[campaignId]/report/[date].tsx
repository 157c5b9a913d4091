import { useLocalSearchParams } from 'expo-router';

import { DayPicker } from '@/components/report/report-screen-parts';
import { ReportView } from '@/components/report/report-view';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { useCampaign } from '@/hooks/campaigns';
import { useDayReport } from '@/hooks/reports';

export default function DayReportScreen() {
  const { campaignId, date } = useLocalSearchParams<{ campaignId: string; date: string }>();
  const campaign = useCampaign(campaignId);
  const report = useDayReport(campaignId, date);
  return (
    <Screen>
      <ScreenHeader
        title={`Daily report · ${date}`}
        subtitle={campaign.data?.name}
        back={`/campaigns/${campaignId}`}
        backLabel="Campaign"
      />
      <ScreenBody>
        <DayPicker campaignId={campaignId} date={date} />
        {report.isError ? <ErrorState error={report.error} onRetry={() => void report.refetch()} /> : null}
        {report.data ? <ReportView report={report.data} /> : report.isError ? null : <LoadingState label="Making the report…" />}
      </ScreenBody>
    </Screen>
  );
}
