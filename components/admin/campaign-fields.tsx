import { StyleSheet, View } from 'react-native';

import { Field } from '@/components/ui/field';
import { useLayout } from '@/hooks/layout';
import type { Campaign } from '@/lib/schemas';
import { space } from '@/lib/tokens';

/** A campaign's set-up as typed: every field text until it is sent. */
export type CampaignDraft = {
  name: string;
  siteName: string;
  datumLat: string;
  datumLon: string;
  permitRef: string;
  vessel: string;
  vehicle: string;
  startDate: string;
  endDate: string;
  timeZone: string;
};

export type CampaignDraftErrors = Partial<Record<keyof CampaignDraft | 'form', string>>;

export const emptyCampaignDraft = (): CampaignDraft => ({
  name: '',
  siteName: '',
  datumLat: '',
  datumLon: '',
  permitRef: '',
  vessel: '',
  vehicle: '',
  startDate: '',
  endDate: '',
  timeZone: 'UTC',
});

export function draftOf(c: Campaign): CampaignDraft {
  return {
    name: c.name,
    siteName: c.siteName,
    datumLat: String(c.datumLat),
    datumLon: String(c.datumLon),
    permitRef: c.permitRef ?? '',
    vessel: c.vessel ?? '',
    vehicle: c.vehicle ?? '',
    startDate: c.startDate ?? '',
    endDate: c.endDate ?? '',
    timeZone: c.timeZone,
  };
}

/** Decimal degrees as people type them, with a point or a comma. */
function degrees(text: string): number | null {
  const t = text.trim().replace(',', '.');
  if (!/^[-+]?\d+(\.\d+)?$/.test(t)) return null;
  return Number(t);
}

/**
 * The body the API takes, or the fields that cannot be read as numbers. Everything else (ranges,
 * dates, the time-zone name) is judged by the server, whose field issues come back to the form.
 */
export function campaignBody(d: CampaignDraft) {
  const errors: CampaignDraftErrors = {};
  const datumLat = degrees(d.datumLat);
  const datumLon = degrees(d.datumLon);
  if (datumLat === null) errors.datumLat = 'Enter the latitude in decimal degrees, north positive (e.g. 36.1450)';
  if (datumLon === null) errors.datumLon = 'Enter the longitude in decimal degrees, east positive (e.g. -7.4320)';
  const optional = (s: string) => (s.trim() ? s.trim() : null);
  return {
    errors,
    body: {
      name: d.name.trim(),
      siteName: d.siteName.trim(),
      datumLat: datumLat ?? 0,
      datumLon: datumLon ?? 0,
      permitRef: optional(d.permitRef),
      vessel: optional(d.vessel),
      vehicle: optional(d.vehicle),
      startDate: optional(d.startDate),
      endDate: optional(d.endDate),
      timeZone: d.timeZone.trim() || 'UTC',
    },
  };
}

/** The server's field issues, first one per field. */
export function issuesToErrors(issues: { path: string; message: string }[]): Record<string, string | undefined> {
  const out: Record<string, string> = {};
  for (const i of issues) {
    const key = i.path.split('.')[0] ?? 'form';
    out[key === '(body)' ? 'form' : key] ??= i.message;
  }
  return out;
}

type Props = {
  draft: CampaignDraft;
  onChange: (next: CampaignDraft) => void;
  errors: CampaignDraftErrors;
  testID: string;
};

/**
 * The fields of a campaign's set-up, shared by its creation and its later edits. No placeholders:
 * an example in grey inside a field reads as a value already filled in, so examples go in the hint below.
 */
export function CampaignFields({ draft, onChange, errors, testID }: Props) {
  const { breakpoint } = useLayout();
  const pair = breakpoint === 'phone' ? styles.column : styles.pair;
  const field = (key: keyof CampaignDraft) => ({
    testID: `${testID}-${key}`,
    value: draft[key],
    error: errors[key],
    onChangeText: (v: string) => onChange({ ...draft, [key]: v }),
  });
  return (
    <View style={styles.wrap}>
      <Field label="Campaign name" hint="Usually the site and the year" {...field('name')} />
      <Field label="Site name" hint="The wreck or area the campaign works at" {...field('siteName')} />
      <View style={pair}>
        <View style={styles.flex}>
          <Field
            label="Site datum latitude (°)"
            hint="Decimal degrees, north positive (WGS 84), for example 36.1450"
            inputMode="decimal"
            mono
            {...field('datumLat')}
          />
        </View>
        <View style={styles.flex}>
          <Field
            label="Site datum longitude (°)"
            hint="Decimal degrees, east positive (WGS 84): west is negative, for example -7.4320"
            inputMode="decimal"
            mono
            {...field('datumLon')}
          />
        </View>
      </View>
      <View style={pair}>
        <View style={styles.flex}>
          <Field label="Starts (optional)" hint="Year-month-day, for example 2026-05-10" mono {...field('startDate')} />
        </View>
        <View style={styles.flex}>
          <Field label="Ends (optional)" hint="Year-month-day, on or after the start" mono {...field('endDate')} />
        </View>
      </View>
      <Field
        label="Display time zone"
        hint="An IANA name such as Europe/Lisbon or UTC; times are stored in UTC either way"
        autoCapitalize="none"
        {...field('timeZone')}
      />
      <Field label="Permit reference (optional)" {...field('permitRef')} />
      <View style={pair}>
        <View style={styles.flex}>
          <Field label="Vessel (optional)" {...field('vessel')} />
        </View>
        <View style={styles.flex}>
          <Field label="Vehicle (optional)" {...field('vehicle')} />
        </View>
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.md },
  pair: { flexDirection: 'row', gap: space.md },
  column: { gap: space.md },
  flex: { flex: 1 },
});
