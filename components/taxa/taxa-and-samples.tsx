import { useState } from 'react';

import { Segmented } from '@/components/ui/segmented';
import { SampleRegister } from './sample-register';
import { TaxaList } from './taxa-list';

/** What a dive or a campaign saw and took: its taxa, or its sample register. */
export function TaxaAndSamples({ scope }: { scope: { campaignId: string } | { diveId: string } }) {
  const [view, setView] = useState<'taxa' | 'samples'>('taxa');
  return (
    <>
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
      {view === 'taxa' ? <TaxaList scope={scope} /> : <SampleRegister scope={scope} />}
    </>
  );
}
