import { AdminOnly } from '@/components/admin/admin-panel';
import { MailLog } from '@/components/admin/mail-log';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { useMe } from '@/hooks/session';

export default function MailLogScreen() {
  const isAdmin = useMe().data?.siteRole === 'admin';
  return (
    <Screen>
      <ScreenHeader title="Mail log" subtitle="What this server sent, is sending, or could not send" back="/admin" />
      <ScreenBody>{isAdmin ? <MailLog /> : <AdminOnly />}</ScreenBody>
    </Screen>
  );
}
