import { useRouter } from 'expo-router';

import { AdminPanel } from '@/components/admin/admin-panel';
import { Button } from '@/components/ui/button';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { useMe } from '@/hooks/session';

export default function AdminScreen() {
  const router = useRouter();
  const isAdmin = useMe().data?.siteRole === 'admin';
  return (
    <Screen>
      <ScreenHeader
        title="Site administration"
        subtitle="Campaigns, their leads and accounts"
        right={
          isAdmin ? (
            <Button label="Mail log" tone="secondary" compact testID="admin-outbox" onPress={() => router.push('/admin/mail')} />
          ) : null
        }
      />
      <ScreenBody>
        <AdminPanel />
      </ScreenBody>
    </Screen>
  );
}
