import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import { usePlanDive, useUpdateDive, type DiveCreate, type DiveUpdate } from '@/hooks/dives';
import { useTheme } from '@/hooks/theme';
import { parseUtcInput, toUtcInput } from '@/lib/format';
import type { Dive } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';

type Plan = { number: string; objectives: string; maxDepth: string; start: string };
type PlanErrors = Partial<Record<keyof Plan | 'form', string>>;

const planOf = (d: Dive): Plan => ({
  number: d.number,
  objectives: d.objectives,
  maxDepth: d.plannedMaxDepth == null ? '' : String(d.plannedMaxDepth),
  start: d.plannedStartAt ? toUtcInput(d.plannedStartAt) : '',
});

/** The typed plan as the contract's values, or the fields that cannot be read. */
function readPlan(p: Plan): { ok: true; maxDepth: number | null; start: string | null } | { ok: false; errors: PlanErrors } {
  const errors: PlanErrors = {};
  const depthText = p.maxDepth.trim().replace(',', '.');
  const maxDepth = depthText === '' ? null : Number(depthText);
  if (maxDepth !== null && (!Number.isFinite(maxDepth) || maxDepth < 0 || maxDepth > 11_000)) {
    errors.maxDepth = 'Metres below the surface, 0 to 11000';
  }
  const start = p.start.trim() === '' ? null : parseUtcInput(p.start);
  if (p.start.trim() !== '' && start === null) errors.start = 'A UTC time as year-month-day hours:minutes, or empty';
  if (!p.number.trim()) errors.number = 'Give the dive a number';
  return Object.keys(errors).length > 0 ? { ok: false, errors } : { ok: true, maxDepth, start };
}

const fromServer = (err: unknown): PlanErrors => {
  if (!(err instanceof ApiError)) return { form: 'Could not save the plan.' };
  const map: Record<string, keyof Plan> = {
    number: 'number',
    objectives: 'objectives',
    plannedMaxDepth: 'maxDepth',
    plannedStartAt: 'start',
  };
  const out: PlanErrors = {};
  for (const i of err.issues) out[map[i.path.split('.')[0] ?? ''] ?? 'form'] ??= i.message;
  if (err.issues.length === 0) {
    out.form =
      err.status === 409 ? 'Someone else changed this dive a moment ago. Close the form to see their plan, then edit again.' : err.message;
  }
  return out;
};

type Props = {
  /** Planning a new dive of this campaign, with the proposed number; or editing `dive`'s plan. */
  campaignId: string;
  proposedNumber?: string;
  dive?: Dive;
  onDone: (dive: Dive) => void;
  onCancel: () => void;
};

/** A dive's plan: its number (fixed once planned), objectives, planned maximum depth and start. */
export function DivePlanForm({ campaignId, proposedNumber = '', dive, onDone, onCancel }: Props) {
  const { colors } = useTheme();
  const [plan, setPlan] = useState<Plan>(() => (dive ? planOf(dive) : { number: proposedNumber, objectives: '', maxDepth: '', start: '' }));
  const [errors, setErrors] = useState<PlanErrors>({});
  const create = usePlanDive(campaignId);
  const update = useUpdateDive(dive?.id ?? '');
  const busy = create.isPending || update.isPending;
  // A field's message goes as soon as the field is changed.
  const change = (patch: Partial<Plan>) => {
    setPlan((p) => ({ ...p, ...patch }));
    setErrors((e) => {
      const next = { ...e, form: undefined };
      for (const k of Object.keys(patch) as (keyof Plan)[]) delete next[k];
      return next;
    });
  };

  const save = () => {
    const read = readPlan(plan);
    if (!read.ok) return setErrors(read.errors);
    const callbacks = { onSuccess: onDone, onError: (err: unknown) => setErrors(fromServer(err)) };
    if (!dive) {
      const body: DiveCreate = {
        number: plan.number.trim(),
        objectives: plan.objectives,
        plannedMaxDepth: read.maxDepth,
        plannedStartAt: read.start,
      };
      return create.mutate(body, callbacks);
    }
    // Only what changed goes out, against the version the form opened at.
    const was = planOf(dive);
    const body: DiveUpdate = { version: dive.version };
    if (plan.objectives !== was.objectives) body.objectives = plan.objectives;
    if (plan.maxDepth.trim() !== was.maxDepth) body.plannedMaxDepth = read.maxDepth;
    if (plan.start.trim() !== was.start) body.plannedStartAt = read.start;
    update.mutate(body, callbacks);
  };

  return (
    <View style={[styles.form, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="dive-plan-form">
      <Text variant="title">{dive ? `Plan of ${dive.number}` : 'Plan a dive'}</Text>
      {dive ? null : (
        <Field
          label="Dive number"
          testID="field-dive-number"
          value={plan.number}
          onChangeText={(number) => change({ number })}
          mono
          autoCapitalize="characters"
          hint={proposedNumber ? 'The next number in the campaign’s pattern is proposed.' : 'Letters, digits and . / - _'}
          error={errors.number}
        />
      )}
      <Field
        label="Objectives"
        testID="field-dive-objectives"
        value={plan.objectives}
        onChangeText={(objectives) => change({ objectives })}
        multiline
        error={errors.objectives}
      />
      <View style={styles.row}>
        <View style={styles.flex}>
          <Field
            label="Planned maximum depth (m)"
            testID="field-dive-max-depth"
            value={plan.maxDepth}
            onChangeText={(maxDepth) => change({ maxDepth })}
            inputMode="decimal"
            keyboardType="decimal-pad"
            mono
            error={errors.maxDepth}
          />
        </View>
        <View style={styles.flex}>
          <Field
            label="Planned start (UTC)"
            testID="field-dive-start"
            value={plan.start}
            onChangeText={(start) => change({ start })}
            mono
            autoCapitalize="none"
            hint="year-month-day hours:minutes, in UTC"
            error={errors.start}
          />
        </View>
      </View>
      {errors.form ? (
        <Text color={colors.danger} role="alert" testID="dive-plan-error">
          {errors.form}
        </Text>
      ) : null}
      <View style={styles.row}>
        <Button label={dive ? 'Save the plan' : 'Plan the dive'} testID="save-dive-plan" busy={busy} onPress={save} />
        <Button label="Cancel" tone="ghost" onPress={onCancel} testID="cancel-dive-plan" />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  form: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, gap: space.md },
  row: { flexDirection: 'row', gap: space.sm, flexWrap: 'wrap', alignItems: 'flex-start' },
  flex: { flex: 1, minWidth: 160 },
});
