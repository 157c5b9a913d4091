import { useLocalSearchParams } from 'expo-router';

import { UnsubscribePanel } from '@/components/digests/unsubscribe-panel';

/** A digest's unsubscribe link, for anyone, signed in or not. */
export default function UnsubscribeScreen() {
  const { token } = useLocalSearchParams<{ token: string }>();
  return <UnsubscribePanel token={token} />;
}
