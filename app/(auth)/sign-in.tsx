import { SignInForm } from '@/components/auth/sign-in-form';

export default function SignInScreen() {
  return <SignInForm />;
}
