import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Chip } from '@/components/ui/chip';
import { Field } from '@/components/ui/field';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import { useTheme } from '@/hooks/theme';
import { useSetWatchPlan } from '@/hooks/watches';
import { formatUtc } from '@/lib/format';
import type { Member, WatchPlan } from '@/lib/schemas';
import { clockMinutes, planIssues } from '@/lib/watches';
import { space } from '@/lib/tokens';

type Draft = { key: string; name: string; start: string; end: string; memberIds: string[] };

let nextKey = 0;
const draftOf = (plan: WatchPlan): Draft[] =>
  plan.watches.map((w) => ({ key: w.id, name: w.name, start: w.start, end: w.end, memberIds: w.members.map((m) => m.id) }));

/**
 * The lead's editor of the watch plan: watches in order, their times in the display zone and who
 * stands each. It starts from the saved plan; the screen keys it by the plan's save time, since the
 * plan is fetched every minute (who is on watch moves with the clock) and that must not wipe an edit.
 */
export function WatchPlanEditor({ plan, members }: { plan: WatchPlan; members: Member[] }) {
  const { colors } = useTheme();
  const save = useSetWatchPlan(plan.campaignId);
  const [watches, setWatches] = useState<Draft[]>(() => draftOf(plan));
  const [mail, setMail] = useState(plan.mailHandovers);

  const change = (i: number, patch: Partial<Draft>) => {
    setWatches((ws) => ws.map((w, j) => (j === i ? { ...w, ...patch } : w)));
  };
  const local = planIssues(watches);
  const server = save.error instanceof ApiError ? save.error.issues : [];
  const issueOf = (path: string) => [...local, ...server].find((x) => x.path === path)?.message;

  return (
    <View style={styles.box} testID="watch-plan-editor">
      <Text
        muted
      >{`Times are in the campaign's display zone (${plan.timeZone}) and repeat daily. A watch may run past midnight; watches may not overlap.`}</Text>
      {watches.map((w, i) => (
        <Card key={w.key} testID={`watch-row-${i}`}>
          <View style={styles.row}>
            <View style={styles.name}>
              <Field
                label="Watch"
                value={w.name}
                onChangeText={(name) => change(i, { name })}
                error={issueOf(`watches.${i}.name`)}
                testID={`watch-name-${i}`}
              />
            </View>
            <View style={styles.time}>
              <Field
                label="Starts"
                mono
                value={w.start}
                placeholder="00:00"
                onChangeText={(start) => change(i, { start })}
                error={issueOf(`watches.${i}.start`)}
                testID={`watch-start-${i}`}
              />
            </View>
            <View style={styles.time}>
              <Field
                label="Ends"
                mono
                value={w.end}
                placeholder="04:00"
                onChangeText={(end) => change(i, { end })}
                error={issueOf(`watches.${i}.end`)}
                testID={`watch-end-${i}`}
              />
            </View>
          </View>
          <Text variant="label">Who stands it</Text>
          <View style={styles.chips}>
            {members.map((m) => (
              <Chip
                key={m.userId}
                label={m.name}
                selected={w.memberIds.includes(m.userId)}
                testID={`watch-member-${i}-${m.email}`}
                onPress={() =>
                  change(i, {
                    memberIds: w.memberIds.includes(m.userId) ? w.memberIds.filter((x) => x !== m.userId) : [...w.memberIds, m.userId],
                  })
                }
              />
            ))}
          </View>
          <View style={styles.row}>
            {issueOf(`watches.${i}.start`) === undefined && issueOf(`watches.${i}.end`) === undefined ? (
              <Text muted variant="caption">{`${clockMinutes(w) / 60} h by the clock`}</Text>
            ) : null}
            <Button
              label="Remove"
              tone="ghost"
              compact
              testID={`watch-remove-${i}`}
              onPress={() => setWatches((ws) => ws.filter((_, j) => j !== i))}
            />
          </View>
        </Card>
      ))}
      <View style={styles.chips}>
        <Button
          label="Add a watch"
          tone="secondary"
          compact
          testID="watch-add"
          onPress={() =>
            setWatches((ws) => [...ws, { key: `new-${nextKey++}`, name: '', start: ws.at(-1)?.end ?? '00:00', end: '', memberIds: [] }])
          }
        />
        <Chip label="Mail each handover to the incoming watch" selected={mail} testID="watch-mail" onPress={() => setMail((m) => !m)} />
      </View>
      <View style={styles.row}>
        <Button
          label="Save the watch plan"
          testID="watch-save"
          busy={save.isPending}
          disabled={local.length > 0}
          onPress={() =>
            save.mutate({
              mailHandovers: mail,
              watches: watches.map(({ name, start, end, memberIds }) => ({ name, start, end, memberIds })),
            })
          }
        />
        {plan.updatedAt ? (
          <Text testID="watch-saved" muted>
            {`Saved ${formatUtc(plan.updatedAt)}`}
          </Text>
        ) : null}
        {save.isError ? (
          <Text testID="watch-error" color={colors.danger}>
            {save.error.message}
          </Text>
        ) : null}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: space.md },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'flex-end' },
  name: { flexGrow: 2, flexBasis: 180 },
  time: { flexGrow: 1, flexBasis: 90 },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'center' },
});
