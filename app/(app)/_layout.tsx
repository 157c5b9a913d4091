import { lazy, Suspense } from 'react';

import { LoadingState } from '@/components/ui/states';

// Loaded when someone signed in first sees a screen of the app, not with the sign-in screen.
const SignedInLayout = lazy(() => import('@/components/layout/signed-in-layout'));

export default function AppLayout() {
  return (
    <Suspense fallback={<LoadingState label="Opening Bathynote…" />}>
      <SignedInLayout />
    </Suspense>
  );
}
