import { useLocalSearchParams } from 'expo-router';

import { InvitationProblem } from '@/components/team/invitation-problem';

/** Where an invitation link that could not be used lands, signed in or not. */
export default function InvitationProblemScreen() {
  const { reason, error } = useLocalSearchParams<{ reason?: string; error?: string }>();
  return <InvitationProblem reason={reason} error={error} />;
}
