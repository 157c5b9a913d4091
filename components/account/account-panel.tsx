import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Chip } from '@/components/ui/chip';
import { Field } from '@/components/ui/field';
import { Segmented } from '@/components/ui/segmented';
import { Text } from '@/components/ui/text';
import { useToast } from '@/components/ui/toast';
import { ApiError } from '@/hooks/api';
import { useMe, useSetFirstPassword, useSignOut } from '@/hooks/session';
import { useChangePassword, useRevokeOtherSessions } from '@/hooks/team';
import { useTheme, type ThemePreference } from '@/hooks/theme';
import { radius, space } from '@/lib/tokens';

export function AccountPanel() {
  const me = useMe().data;
  const signOut = useSignOut();
  const { preference, setPreference, colors } = useTheme();
  return (
    <View style={styles.wrap}>
      {me ? (
        <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]}>
          <Text variant="title">{me.user.name}</Text>
          <Text muted testID="account-email">
            {me.user.email}
          </Text>
          {me.siteRole === 'admin' ? <Text variant="caption">Site administrator</Text> : null}
        </View>
      ) : null}
      <Segmented<ThemePreference>
        label="Theme"
        testID="theme"
        value={preference}
        onChange={setPreference}
        options={[
          { value: 'system', label: 'Follow the device' },
          { value: 'dark', label: 'Dark (control room)' },
          { value: 'light', label: 'Light' },
        ]}
      />
      {me ? me.hasPassword ? <ChangePassword /> : <SetFirstPassword /> : null}
      {me ? <OtherSessions /> : null}
      <Button label="Sign out" tone="secondary" testID="sign-out" busy={signOut.isPending} onPress={() => signOut.mutate()} />
      <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]}>
        <Text variant="label">Cautions</Text>
        <Text variant="caption" muted>
          Bathynote records; it does not authorise. Underwater cultural heritage is protected by law in most waters (and by the UNESCO 2001
          Convention where it applies): recovering an object needs a permit, and a recovered artefact needs immediate conservation care —
          kept wet — by a conservator. Biological sampling can need permits, including access and benefit-sharing rules. Follow local law
          and licensed practice.
        </Text>
        <Text variant="caption" muted>
          Bathynote is not a navigation or vehicle-control system: never steer the vehicle or judge a dive’s safety from it.
        </Text>
      </View>
    </View>
  );
}

const PASSWORD_MIN = 8;
const PASSWORD_MAX = 128;

type PasswordErrors = Partial<Record<'current' | 'next' | 'repeat' | 'form', string>>;

/** What the sign-in service said, placed at the field it is about. */
function passwordErrors(err: unknown): PasswordErrors {
  if (!err) return {};
  if (!(err instanceof ApiError)) return { form: 'The password was not changed. Try again.' };
  if (err.code === 'invalid_password') return { current: 'That is not your current password.' };
  if (err.code === 'password_too_short' || err.code === 'password_too_long') {
    return { next: `A password has ${PASSWORD_MIN} to ${PASSWORD_MAX} characters.` };
  }
  if (err.status === 429) return { form: 'Too many attempts. Wait a minute before trying again.' };
  return { form: err.message };
}

/** The new password, typed twice, as both password forms ask for it. */
function NewPasswordFields(props: {
  next: string;
  repeat: string;
  onNext: (v: string) => void;
  onRepeat: (v: string) => void;
  errors: PasswordErrors;
  onSubmit: () => void;
}) {
  return (
    <>
      <Field
        label="New password"
        testID="password-new"
        value={props.next}
        onChangeText={props.onNext}
        secureTextEntry
        autoComplete="new-password"
        hint={`${PASSWORD_MIN} to ${PASSWORD_MAX} characters`}
        error={props.errors.next}
      />
      <Field
        label="Repeat the new password"
        testID="password-repeat"
        value={props.repeat}
        onChangeText={props.onRepeat}
        secureTextEntry
        autoComplete="new-password"
        error={props.errors.repeat}
        onSubmitEditing={props.onSubmit}
      />
    </>
  );
}

function ChangePassword() {
  const { colors } = useTheme();
  const toast = useToast();
  const change = useChangePassword();
  const [open, setOpen] = useState(false);
  const [current, setCurrent] = useState('');
  const [next, setNext] = useState('');
  const [repeat, setRepeat] = useState('');
  const [signOutOthers, setSignOutOthers] = useState(true);
  const [local, setLocal] = useState<PasswordErrors>({});
  const errors = { ...passwordErrors(change.error), ...local };

  const close = () => {
    setOpen(false);
    setCurrent('');
    setNext('');
    setRepeat('');
    setLocal({});
    change.reset();
  };
  const submit = () => {
    const bad: PasswordErrors = {};
    if (!current) bad.current = 'Enter your current password.';
    if (next.length < PASSWORD_MIN || next.length > PASSWORD_MAX)
      bad.next = `A password has ${PASSWORD_MIN} to ${PASSWORD_MAX} characters.`;
    else if (repeat !== next) bad.repeat = 'The two new passwords are not the same.';
    setLocal(bad);
    if (Object.keys(bad).length > 0 || change.isPending) return;
    change.mutate(
      { currentPassword: current, newPassword: next, revokeOtherSessions: signOutOthers },
      {
        onSuccess: () => {
          toast(signOutOthers ? 'Password changed; your other sessions are signed out.' : 'Password changed.');
          close();
        },
      },
    );
  };

  if (!open) {
    return <Button label="Change password" tone="secondary" testID="change-password" onPress={() => setOpen(true)} />;
  }
  return (
    <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="change-password-form">
      <Text variant="label">Change password</Text>
      <Field
        label="Current password"
        testID="password-current"
        value={current}
        onChangeText={setCurrent}
        secureTextEntry
        autoComplete="current-password"
        error={errors.current}
      />
      <NewPasswordFields next={next} repeat={repeat} onNext={setNext} onRepeat={setRepeat} errors={errors} onSubmit={submit} />
      <View style={styles.row}>
        <Chip
          label="Sign out my other sessions"
          selected={signOutOthers}
          onPress={() => setSignOutOthers(!signOutOthers)}
          testID="password-sign-out-others"
        />
      </View>
      {errors.form ? (
        <Text color={colors.danger} role="alert" testID="password-error">
          {errors.form}
        </Text>
      ) : null}
      <View style={styles.row}>
        <Button label="Save new password" testID="password-save" busy={change.isPending} onPress={submit} />
        <Button label="Cancel" tone="secondary" onPress={close} />
      </View>
    </View>
  );
}

/** For a person who joined by an invitation link: a first password, with no current one to give. */
function SetFirstPassword() {
  const { colors } = useTheme();
  const toast = useToast();
  const set = useSetFirstPassword();
  const [next, setNext] = useState('');
  const [repeat, setRepeat] = useState('');
  const [local, setLocal] = useState<PasswordErrors>({});
  const errors = { ...passwordErrors(set.error), ...local };
  const submit = () => {
    const bad: PasswordErrors = {};
    if (next.length < PASSWORD_MIN || next.length > PASSWORD_MAX)
      bad.next = `A password has ${PASSWORD_MIN} to ${PASSWORD_MAX} characters.`;
    else if (repeat !== next) bad.repeat = 'The two passwords are not the same.';
    setLocal(bad);
    if (Object.keys(bad).length > 0 || set.isPending) return;
    set.mutate(next, { onSuccess: () => toast('Password set. Sign in with it next time.') });
  };
  return (
    <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="set-password-form">
      <Text variant="label">Set a password</Text>
      <Text variant="caption" muted>
        You joined with the link in your invitation and have no password yet. Set one to sign in again after this session ends.
      </Text>
      <NewPasswordFields
        next={next}
        repeat={repeat}
        onNext={(v) => {
          setNext(v);
          setLocal({});
        }}
        onRepeat={(v) => {
          setRepeat(v);
          setLocal({});
        }}
        errors={errors}
        onSubmit={submit}
      />
      {errors.form ? (
        <Text color={colors.danger} role="alert" testID="password-error">
          {errors.form}
        </Text>
      ) : null}
      <Button label="Set password" testID="password-set" busy={set.isPending} onPress={submit} />
    </View>
  );
}

/** Ends every session but this one: a phone left in the control room, a laptop ashore. */
function OtherSessions() {
  const { colors } = useTheme();
  const toast = useToast();
  const revoke = useRevokeOtherSessions();
  return (
    <View style={styles.gapSm}>
      <Button
        label="Sign out everywhere else"
        tone="secondary"
        testID="sign-out-others"
        busy={revoke.isPending}
        onPress={() => revoke.mutate(undefined, { onSuccess: () => toast('Signed out on every other device; this one stays signed in.') })}
      />
      {revoke.error ? (
        <Text color={colors.danger} role="alert">
          {revoke.error instanceof ApiError ? revoke.error.message : 'Not done. Try again.'}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'center' },
  gapSm: { gap: space.sm },
  wrap: { gap: space.lg },
  box: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, gap: space.sm },
});
