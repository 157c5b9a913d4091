import { AdminOnly } from '@/components/admin/admin-panel';
import { MailOutbox } from '@/components/admin/mail-outbox';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { useMe } from '@/hooks/session';

export default function OutboxScreen() {
  const isAdmin = useMe().data?.siteRole === 'admin';
  return (
    <Screen>
      <ScreenHeader title="Outbox" subtitle="Mail this server caught instead of sending" back="/admin" />
      <ScreenBody>{isAdmin ? <MailOutbox /> : <AdminOnly />}</ScreenBody>
    </Screen>
  );
}
