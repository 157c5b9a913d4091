import { useLocalSearchParams } from 'expo-router';
import { useState } from 'react';

import { SampleRegister } from '@/components/taxa/sample-register';
import { TaxaList } from '@/components/taxa/taxa-list';
import { Segmented } from '@/components/ui/segmented';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { useDive } from '@/hooks/dives';

export default function DiveTaxaScreen() {
  const { diveId } = useLocalSearchParams<{ diveId: string }>();
  const dive = useDive(diveId);
  const [view, setView] = useState<'taxa' | 'samples'>('taxa');
  return (
    <Screen>
      <ScreenHeader
        title={dive.data ? `Dive ${dive.data.number} · taxa and samples` : 'Dive taxa and samples'}
        back={`/dives/${diveId}`}
        backLabel="Dive log"
      />
      <ScreenBody>
        <Segmented
          label="Show"
          hideLabel
          value={view}
          onChange={setView}
          options={[
            { value: 'taxa', label: 'Taxa' },
            { value: 'samples', label: 'Samples' },
          ]}
          testID="record-view"
        />
        {view === 'taxa' ? <TaxaList scope={{ diveId }} /> : <SampleRegister scope={{ diveId }} />}
      </ScreenBody>
    </Screen>
  );
}
