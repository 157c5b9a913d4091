import { useState } from 'react';
import { Platform, StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import { useAddSubstrate, useChangeSubstrate, useChecklist, useImportChecklist, useSubstrates } from '@/hooks/taxa';
import { useTheme } from '@/hooks/theme';
import { substrateStandard } from '@/lib/substrates';
import type { ChecklistReport, SubstrateClass } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';

/**
 * The lead's part of the biology record: the substrate classes entries name, and the species
 * list the identification form suggests from.
 */
export function BiologySettings({ campaignId, lead }: { campaignId: string; lead: boolean }) {
  return (
    <View style={styles.wrap}>
      <SubstrateSettings campaignId={campaignId} lead={lead} />
      <ChecklistSettings campaignId={campaignId} lead={lead} />
    </View>
  );
}

function SubstrateSettings({ campaignId, lead }: { campaignId: string; lead: boolean }) {
  const { colors } = useTheme();
  const substrates = useSubstrates(campaignId);
  const add = useAddSubstrate(campaignId);
  const [name, setName] = useState('');
  return (
    <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="substrate-settings">
      <Text variant="title">Substrate classes</Text>
      <Text variant="caption" muted>
        A new campaign starts from the substrate classes of {substrateStandard}; rename, add or retire classes to fit the site. A retired
        class stays on the entries that have it.
      </Text>
      {(substrates.data?.items ?? []).map((s) => (
        <SubstrateRow key={s.id} campaignId={campaignId} substrate={s} lead={lead} />
      ))}
      {lead ? (
        <View style={styles.row}>
          <View style={styles.grow}>
            <Field
              label="New class"
              testID="field-new-substrate"
              value={name}
              onChangeText={setName}
              error={add.error instanceof ApiError ? add.error.message : undefined}
            />
          </View>
          <Button
            label="Add class"
            compact
            testID="add-substrate"
            busy={add.isPending}
            disabled={!name.trim()}
            onPress={() => add.mutate(name.trim(), { onSuccess: () => setName('') })}
          />
        </View>
      ) : null}
    </View>
  );
}

function SubstrateRow({ campaignId, substrate: s, lead }: { campaignId: string; substrate: SubstrateClass; lead: boolean }) {
  const change = useChangeSubstrate(campaignId);
  const [renaming, setRenaming] = useState(false);
  const [name, setName] = useState(s.name);
  return (
    <View style={styles.item} testID={`substrate-row-${s.name}`}>
      {renaming ? (
        <View style={styles.row}>
          <View style={styles.grow}>
            <Field
              label={`Rename ${s.name}`}
              value={name}
              onChangeText={setName}
              error={change.error instanceof ApiError ? change.error.message : undefined}
            />
          </View>
          <Button
            label="Save"
            compact
            busy={change.isPending}
            onPress={() => change.mutate({ id: s.id, name: name.trim() }, { onSuccess: () => setRenaming(false) })}
          />
          <Button label="Cancel" tone="ghost" compact onPress={() => setRenaming(false)} />
        </View>
      ) : (
        <View style={styles.row}>
          <View style={styles.grow}>
            <Text muted={s.retired}>
              {s.name}
              {s.retired ? ' (retired)' : ''}
            </Text>
            <Text variant="caption" muted>
              {[s.origin, s.standardName && s.standardName !== s.name ? `from ${s.standardName}` : null, `${s.entryCount} entries`]
                .filter(Boolean)
                .join(' · ')}
            </Text>
          </View>
          {lead ? (
            <>
              <Button label="Rename" tone="ghost" compact onPress={() => setRenaming(true)} />
              <Button
                label={s.retired ? 'Bring back' : 'Retire'}
                tone="ghost"
                compact
                onPress={() => change.mutate({ id: s.id, retired: !s.retired })}
              />
            </>
          ) : null}
        </View>
      )}
    </View>
  );
}

/** A file chosen in the browser; native builds have no species list import yet. */
function pickCsv(onPick: (file: File) => void) {
  if (Platform.OS !== 'web' || typeof document === 'undefined') return;
  const input = document.createElement('input');
  input.type = 'file';
  input.accept = '.csv,.tsv,.txt,text/csv,text/plain';
  input.onchange = () => {
    const file = input.files?.[0];
    if (file) onPick(file);
  };
  input.click();
}

function ChecklistSettings({ campaignId, lead }: { campaignId: string; lead: boolean }) {
  const { colors } = useTheme();
  const list = useChecklist(campaignId);
  const importing = useImportChecklist(campaignId);
  const [report, setReport] = useState<ChecklistReport | null>(null);
  const count = list.data?.items.length ?? 0;
  return (
    <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="checklist-settings">
      <Text variant="title">Species list</Text>
      <Text variant="caption" muted>
        The names the identification form suggests first. A CSV with a header row: scientificName, scientificNameAuthorship, taxonRank,
        scientificNameID (an LSID or link) and vernacularName. A name already on the list is updated.
      </Text>
      <Text testID="checklist-count">{count === 0 ? 'No species list yet.' : `${count} names on the list.`}</Text>
      {lead ? (
        <Button
          label={importing.isPending ? 'Importing…' : 'Import a species list…'}
          tone="secondary"
          compact
          testID="import-checklist"
          busy={importing.isPending}
          onPress={() =>
            pickCsv((file) => {
              setReport(null);
              importing.mutate({ file, name: file.name }, { onSuccess: setReport });
            })
          }
        />
      ) : null}
      {importing.error instanceof ApiError ? (
        <Text color={colors.danger} testID="checklist-error">
          {importing.error.message}
        </Text>
      ) : null}
      {report ? (
        <View style={styles.report} testID="checklist-report">
          <Text>
            {report.taken} of {report.total} rows taken ({report.added} new, {report.updated} updated)
            {report.rejected.length > 0 ? `; ${report.rejected.length} left out:` : '.'}
          </Text>
          {report.rejected.slice(0, 50).map((r) => (
            <Text key={r.line} variant="caption" color={colors.warning}>
              {r.message}
            </Text>
          ))}
          {report.rejected.length > 50 ? (
            <Text variant="caption" muted>
              and {report.rejected.length - 50} more
            </Text>
          ) : null}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.lg },
  box: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, gap: space.sm },
  item: { paddingVertical: space.xs },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'center' },
  grow: { flexGrow: 1, flexShrink: 1, minWidth: 160 },
  report: { gap: 2 },
});
