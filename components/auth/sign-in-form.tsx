import { useRef, useState } from 'react';
import { KeyboardAvoidingView, Platform, StyleSheet, View, type TextInput } from 'react-native';

import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import { useRequestSignInLink, useSignIn } from '@/hooks/session';
import { useTheme } from '@/hooks/theme';
import { radius, space } from '@/lib/tokens';

export function SignInForm() {
  const { colors } = useTheme();
  const signIn = useSignIn();
  const askLink = useRequestSignInLink();
  const [email, setEmail] = useState('');
  const [password, setPassword] = useState('');
  const passwordRef = useRef<TextInput>(null);

  const error = signIn.error;
  const fieldError = (path: string) => (error instanceof ApiError ? error.issues.find((i) => i.path === path)?.message : undefined);
  const formError =
    error instanceof ApiError
      ? error.status === 401
        ? 'That e-mail and password do not match an account.'
        : error.status === 429
          ? 'Too many attempts. Wait a minute before trying again.'
          : error.issues.length > 0
            ? undefined
            : error.message
      : error
        ? 'Could not sign in.'
        : undefined;

  const submit = () => {
    if (!signIn.isPending) signIn.mutate({ email: email.trim(), password });
  };

  return (
    <KeyboardAvoidingView behavior={Platform.OS === 'ios' ? 'padding' : undefined} style={[styles.page, { backgroundColor: colors.bg }]}>
      <View style={[styles.card, { backgroundColor: colors.surface, borderColor: colors.border }]}>
        <View style={styles.brand}>
          <Text variant="heading" color={colors.accent}>
            Bathynote
          </Text>
          <Text muted>The shared observation notebook of the dive.</Text>
        </View>
        <Field
          label="E-mail"
          testID="sign-in-email"
          value={email}
          onChangeText={setEmail}
          autoCapitalize="none"
          autoComplete="email"
          keyboardType="email-address"
          inputMode="email"
          returnKeyType="next"
          onSubmitEditing={() => passwordRef.current?.focus()}
          error={fieldError('email')}
        />
        <Field
          ref={passwordRef}
          label="Password"
          testID="sign-in-password"
          value={password}
          onChangeText={setPassword}
          secureTextEntry
          autoComplete="current-password"
          returnKeyType="go"
          onSubmitEditing={submit}
          error={fieldError('password')}
        />
        {formError ? (
          <Text color={colors.danger} role="alert" testID="sign-in-error">
            {formError}
          </Text>
        ) : null}
        <Button label="Sign in" testID="sign-in-submit" busy={signIn.isPending} onPress={submit} />
        <Button
          label="E-mail me a sign-in link"
          tone="secondary"
          testID="sign-in-link"
          busy={askLink.isPending}
          onPress={() => {
            if (!askLink.isPending) askLink.mutate(email.trim());
          }}
        />
        {askLink.data ? (
          <Text role="status" testID="sign-in-link-sent">
            {askLink.data.message}
          </Text>
        ) : askLink.error ? (
          <Text color={colors.danger} role="alert" testID="sign-in-link-error">
            {askLink.error instanceof ApiError
              ? askLink.error.status === 429
                ? 'Too many links asked for. Wait a while before trying again.'
                : (askLink.error.issues[0]?.message ?? askLink.error.message)
              : 'No link was asked for. Try again.'}
          </Text>
        ) : null}
        <Text variant="caption" muted>
          New members join a campaign through the invitation their campaign lead sends by e-mail. Members without a password (or who forgot
          it) can ask for a sign-in link.
        </Text>
      </View>
      <Text variant="caption" muted style={styles.caution}>
        Bathynote records what is seen. It is not a navigation or vehicle-control system: never steer or judge a dive’s safety from it.
      </Text>
    </KeyboardAvoidingView>
  );
}

const styles = StyleSheet.create({
  page: { flex: 1, alignItems: 'center', justifyContent: 'center', padding: space.lg, gap: space.lg },
  card: { width: '100%', maxWidth: 400, borderWidth: 1, borderRadius: radius.lg, padding: space.xl, gap: space.lg },
  brand: { gap: space.xs },
  caution: { maxWidth: 400, textAlign: 'center' },
});
