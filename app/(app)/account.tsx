import { AccountPanel } from '@/components/account/account-panel';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';

export default function AccountScreen() {
  return (
    <Screen>
      <ScreenHeader title="Account" />
      <ScreenBody>
        <AccountPanel />
      </ScreenBody>
    </Screen>
  );
}
