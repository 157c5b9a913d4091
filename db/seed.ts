/**
 * The invented demo: campaign "Varn Shoal 2026" aboard the research vessel Morrow Tide with
 * ROV Skerry, and the older "Varn Shoal 2024". Every name, place and number here is made up.
 */
import { hashPassword } from 'better-auth/crypto';
import { count } from 'drizzle-orm';

import type { CampaignRole, ObservationKind } from '../lib/schemas';
import type { Db } from './client';
import { random } from './seed-random';
import { seedTelemetry } from './seed-telemetry';
import * as s from './schema';

export const DEMO_PASSWORD = 'bathynote-demo';

export const demoPeople = [
  { key: 'admin', email: 'admin@bathynote.test', name: 'Site Administrator', site: 'admin' },
  { key: 'lead', email: 'lead@bathynote.test', name: 'Ada Lumen', site: 'user' },
  { key: 'archaeologist', email: 'archaeologist@bathynote.test', name: 'Bram Ostrander', site: 'user' },
  { key: 'biologist', email: 'biologist@bathynote.test', name: 'Cleo Varga', site: 'user' },
  { key: 'pilot', email: 'pilot@bathynote.test', name: 'Dev Pillai', site: 'user' },
  { key: 'guest', email: 'guest@bathynote.test', name: 'Elin Sato', site: 'user' },
  { key: 'outsider', email: 'outsider@bathynote.test', name: 'Oren Quist', site: 'user' },
] as const;
type PersonKey = (typeof demoPeople)[number]['key'];

/** What `npm start` prints: each demo sign-in and what its role may do. */
export const demoSignIns: { email: string; role: string }[] = [
  { email: 'admin@bathynote.test', role: 'site administrator: creates campaigns and their leads' },
  { email: 'lead@bathynote.test', role: 'lead of both campaigns (Ada Lumen)' },
  { email: 'archaeologist@bathynote.test', role: 'scientist, archaeologist (Bram Ostrander)' },
  { email: 'biologist@bathynote.test', role: 'scientist, biologist (Cleo Varga)' },
  { email: 'pilot@bathynote.test', role: 'pilot of ROV Skerry (Dev Pillai)' },
  { email: 'guest@bathynote.test', role: 'guest biologist ashore, 2026 only (Elin Sato)' },
  { email: 'outsider@bathynote.test', role: 'member of no campaign (Oren Quist)' },
];

function shuffled<T>(items: T[], rand: () => number): T[] {
  const out = [...items];
  for (let i = out.length - 1; i > 0; i--) {
    const j = Math.floor(rand() * (i + 1));
    [out[i], out[j]] = [out[j]!, out[i]!];
  }
  return out;
}

type Template = {
  kind: ObservationKind;
  by: PersonKey;
  title: string;
  note: string;
  tags: string[];
  /** A proposed name, and who verified it (if anyone). */
  identification?: {
    name: string;
    rank: 'species' | 'genus' | 'family' | 'class';
    qualifier?: 'cf.' | 'aff.' | 'sp.' | 'indet.';
    verifiedBy?: PersonKey;
    status?: 'verified' | 'disputed';
  };
  /** A registered find, and for a recovered one who has held it. */
  find?: { objectType: string; material: string; condition: string; state: 'in-situ' | 'recovered' };
};

const biology: Template[] = [
  {
    kind: 'biology',
    by: 'biologist',
    title: 'Microbial mat on the port frames',
    note: 'White to pale-orange **microbial mat** draping the exposed port frames, thickest where the\nplanking has gone. Patchy, about 40 % cover over 2 m of frame.\n\n- texture: filamentous, lifts in the thruster wash\n- no visible grazers on it',
    tags: ['microbial-mat', 'hull'],
  },
  {
    kind: 'biology',
    by: 'biologist',
    title: 'Rust-coloured concretions on the bow',
    note: 'Iron-oxidising bacterial structures (rust-coloured, drip-shaped concretions) hanging from the\nbow fittings, up to ~15 cm long. Brittle: the thruster wash broke the tip off one.',
    tags: ['concretion', 'hull'],
  },
  {
    kind: 'biology',
    by: 'biologist',
    title: 'Cold-water coral colony on the stern rail',
    identification: { name: 'Desmophyllum pertusum', rank: 'species', verifiedBy: 'lead', status: 'verified' },
    note: 'Live colony of *Desmophyllum pertusum*, white polyps extended, roughly 60 × 40 cm, growing\nfrom the stern rail towards the current. Dead framework beneath.',
    tags: ['coral', 'stern'],
  },
  {
    kind: 'biology',
    by: 'biologist',
    title: 'Glass sponge at the sternpost',
    note: 'Vase-shaped hexactinellid sponge, ~25 cm tall, attached at the sternpost base. Two small\nophiuroids in the osculum.',
    tags: ['sponge', 'stern'],
  },
  {
    kind: 'biology',
    by: 'biologist',
    title: 'Squat lobster in an amphora mouth',
    identification: { name: 'Munida', rank: 'genus', qualifier: 'sp.' },
    note: '*Munida* sp. sheltering in the mouth of an amphora in the cargo mound; retreated when the\nlights came close.',
    tags: ['crustacean', 'amphora'],
  },
  {
    kind: 'biology',
    by: 'biologist',
    title: 'Conger under the hull timbers',
    identification: { name: 'Conger conger', rank: 'species', qualifier: 'cf.', verifiedBy: 'lead', status: 'disputed' },
    note: 'Large conger eel (est. 1.5 m) in the gap between two hull timbers, head out, facing the\ncurrent. Seen again on the way back along the starboard side.',
    tags: ['fish', 'timber'],
  },
  {
    kind: 'biology',
    by: 'guest',
    title: 'Brittle stars on the sediment apron',
    identification: { name: 'Ophiuroidea', rank: 'class', qualifier: 'indet.' },
    note: 'Dense brittle stars on the sediment around the cargo mound — from the feed it looks like\n10–20 per frame. Worth a count on the mosaic.',
    tags: ['echinoderm', 'sediment'],
  },
  {
    kind: 'biology',
    by: 'biologist',
    title: 'Anemone on an amphora neck',
    note: 'Solitary anemone (tentacles ~5 cm) on the neck of a toppled amphora. Pale, translucent.',
    tags: ['amphora'],
  },
  {
    kind: 'biology',
    by: 'biologist',
    title: 'Grenadier passing the bow',
    identification: { name: 'Macrouridae', rank: 'family', qualifier: 'indet.' },
    note: 'Macrourid swimming slowly head-down past the bow, ~40 cm. Out of frame after 6 s.',
    tags: ['fish'],
  },
  {
    kind: 'biology',
    by: 'biologist',
    title: 'Push core of the mat for microbiology',
    note: 'Push core **PC-2** through the mat beside the port frames, 12 cm recovery, stored upright in\nthe bio-box. Needs cold storage on deck.',
    tags: ['microbial-mat', 'sample'],
  },
];

const archaeology: Template[] = [
  {
    kind: 'archaeology',
    by: 'archaeologist',
    title: 'Amphora with both handles, in situ',
    find: { objectType: 'amphora', material: 'ceramic', condition: 'complete, both handles', state: 'in-situ' },
    note: 'Complete amphora lying on its side at the edge of the cargo mound, both handles intact,\nmouth to the north-east. **Left in situ.**',
    tags: ['amphora', 'cargo'],
  },
  {
    kind: 'archaeology',
    by: 'archaeologist',
    title: 'Stack of coarse ware bowls',
    find: { objectType: 'bowl stack', material: 'coarse ware', condition: 'rims chipped', state: 'in-situ' },
    note: 'At least six coarse ware bowls nested in a stack, partly buried, amidships. Rims chipped,\nno glaze visible.',
    tags: ['coarse-ware', 'cargo'],
  },
  {
    kind: 'archaeology',
    by: 'archaeologist',
    title: 'Hull timber with treenails',
    note: 'Exposed strake on the port side showing a row of treenails at ~20 cm spacing. Timber surface\neroded, fastenings stand proud.\n\n| feature | value |\n| --- | --- |\n| spacing | ~20 cm |\n| visible length | ~1.8 m |',
    tags: ['hull', 'timber'],
  },
  {
    kind: 'archaeology',
    by: 'archaeologist',
    title: 'Lead sheathing fragment',
    find: { objectType: 'hull sheathing', material: 'lead', condition: 'folded, nail holes', state: 'recovered' },
    note: 'Folded sheet of lead sheathing, ~30 cm, with nail holes, lying off the starboard quarter.',
    tags: ['hull'],
  },
  {
    kind: 'archaeology',
    by: 'archaeologist',
    title: 'Ballast stones amidships',
    note: 'Rounded ballast stones, fist to head size, under the collapsed frames amidships.',
    tags: ['ballast'],
  },
  {
    kind: 'archaeology',
    by: 'archaeologist',
    title: 'Amphora toe sticking out of the sediment',
    note: 'Only the toe visible, angled ~30° from vertical. Possibly a second layer of cargo below.',
    tags: ['amphora', 'sediment'],
  },
  {
    kind: 'archaeology',
    by: 'lead',
    title: 'Bow outline traced on the video',
    note: 'The bow outline is now clear on the forward camera: the stem has collapsed to starboard.\nPlan for the next dive: a mosaic line along the keel.',
    tags: ['hull', 'mosaic'],
  },
];

const environment: Template[] = [
  {
    kind: 'environment',
    by: 'pilot',
    title: 'Visibility down to about 3 m',
    note: 'Resuspended sediment after working near the mound; waiting for the current to clear it.',
    tags: ['visibility'],
  },
  {
    kind: 'environment',
    by: 'pilot',
    title: 'Current picking up from the north-east',
    note: 'Estimated 0.3 kn from the NE, vehicle crabbing to hold station.',
    tags: ['current'],
  },
  {
    kind: 'environment',
    by: 'biologist',
    title: 'Ripple marks on the sediment apron',
    note: 'Small ripple marks, crests aligned NW–SE, on the apron west of the wreck.',
    tags: ['sediment', 'current'],
  },
];

const operations: Template[] = [
  {
    kind: 'operations',
    by: 'pilot',
    title: 'Laser scaler checked',
    note: 'Parallel lasers at 10 cm confirmed on the calibration board before descent.',
    tags: ['equipment'],
  },
  {
    kind: 'operations',
    by: 'pilot',
    title: 'Mosaic line started along the keel',
    note: 'Altitude 2.5 m, 0.2 kn, downward camera at 2 s interval.',
    tags: ['mosaic'],
  },
  {
    kind: 'operations',
    by: 'pilot',
    title: 'Position fix lost for about a minute',
    note: 'Acoustic positioning dropped out for ~60 s near the stern; positions in that window are\ninterpolated.',
    tags: ['equipment'],
  },
];

const quickMarks: { label: string; kind: ObservationKind; tags: string[] }[] = [
  { label: 'Microbial mat', kind: 'biology', tags: ['microbial-mat'] },
  { label: 'Coral', kind: 'biology', tags: ['coral'] },
  { label: 'Fish', kind: 'biology', tags: ['fish'] },
  { label: 'Amphora', kind: 'archaeology', tags: ['amphora', 'cargo'] },
  { label: 'Sample taken', kind: 'biology', tags: ['sample'] },
  { label: 'Position fix lost', kind: 'operations', tags: ['equipment'] },
];

const vocabulary2026 = [
  'microbial-mat',
  'concretion',
  'coral',
  'sponge',
  'fish',
  'crustacean',
  'echinoderm',
  'amphora',
  'coarse-ware',
  'cargo',
  'hull',
  'timber',
  'ballast',
  'stern',
  'sediment',
  'sample',
  'current',
  'visibility',
  'equipment',
  'mosaic',
];

type DivePlan = {
  number: string;
  day: string; // UTC date of launch
  launch: string; // HH:MM UTC
  objectives: string;
  bottom: number; // typical bottom depth, m
  entries: number;
};

const plans2026: DivePlan[] = [
  {
    number: 'VS-01',
    day: '2026-05-12',
    launch: '18:05',
    objectives: 'Survey the wreck outline; locate bow and stern.',
    bottom: 612,
    entries: 18,
  },
  {
    number: 'VS-02',
    day: '2026-05-13',
    launch: '17:40',
    objectives: 'Cargo mound: amphorae and coarse ware; first biology transect.',
    bottom: 598,
    entries: 20,
  },
  {
    number: 'VS-03',
    day: '2026-05-14',
    launch: '18:20',
    objectives: 'Stern: corals and sponges; push cores through the microbial mat.',
    bottom: 584,
    entries: 18,
  },
  {
    number: 'VS-04',
    day: '2026-05-16',
    launch: '19:00',
    objectives: 'Mosaic line along the keel; recover the sample set.',
    bottom: 605,
    entries: 12,
  },
];

const plans2024: DivePlan[] = [
  { number: 'VS24-01', day: '2024-06-03', launch: '16:30', objectives: 'First look at the sonar target.', bottom: 606, entries: 7 },
  { number: 'VS24-02', day: '2024-06-05', launch: '17:10', objectives: 'Cargo mound and the bow.', bottom: 601, entries: 7 },
];

function at(day: string, hhmm: string, plusMinutes = 0): Date {
  return new Date(new Date(`${day}T${hhmm}:00.000Z`).getTime() + plusMinutes * 60_000);
}

/** True when the database already holds any campaign or any person. */
export function hasData(db: Db): boolean {
  const users = db.select({ n: count() }).from(s.user).get()?.n ?? 0;
  const campaigns = db.select({ n: count() }).from(s.campaigns).get()?.n ?? 0;
  return users > 0 || campaigns > 0;
}

/** Seeds the demo into an empty database; does nothing (and says so) when there is data. */
export async function seedDemo(db: Db): Promise<{ seeded: boolean; observations: number }> {
  if (hasData(db)) return { seeded: false, observations: 0 };
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const rand = random(20260512);
  const now = new Date();

  let total = 0;
  db.transaction((tx) => {
    const ids = {} as Record<PersonKey, string>;
    for (const p of demoPeople) {
      const id = crypto.randomUUID();
      ids[p.key] = id;
      tx.insert(s.user)
        .values({ id, name: p.name, email: p.email, emailVerified: true, role: p.site, createdAt: now, updatedAt: now })
        .run();
      tx.insert(s.account)
        .values({ id: crypto.randomUUID(), accountId: id, providerId: 'credential', userId: id, password: passwordHash })
        .run();
    }

    const makeCampaign = (
      values: typeof s.campaigns.$inferInsert,
      members: [PersonKey, CampaignRole][],
      plans: DivePlan[],
      findPrefix: string,
    ) => {
      const campaign = tx.insert(s.campaigns).values(values).returning().get();
      let findCount = 0;
      quickMarks.forEach((q, position) =>
        tx
          .insert(s.quickMarks)
          .values({ campaignId: campaign.id, ...q, position })
          .run(),
      );
      for (const [key, role] of members) tx.insert(s.memberships).values({ campaignId: campaign.id, userId: ids[key], role }).run();
      // Guests ashore follow the campaign through the digest after each dive, as invited guests do.
      for (const [key, role] of members) {
        if (role !== 'guest') continue;
        tx.insert(s.subscriptions)
          .values({ campaignId: campaign.id, userId: ids[key], frequency: 'after-each-dive', unsubscribeNonce: crypto.randomUUID() })
          .run();
      }
      const tagIds = new Map<string, string>();
      for (const name of vocabulary2026) {
        tagIds.set(name, tx.insert(s.tags).values({ campaignId: campaign.id, name }).returning().get().id);
      }
      const memberKeys = new Set(members.map(([k]) => k));
      const pool = [...biology, ...archaeology, ...environment, ...operations].filter((t) => memberKeys.has(t.by));

      for (const plan of plans) {
        const launch = at(plan.day, plan.launch);
        const descentMin = plan.bottom / 22;
        const onBottom = new Date(launch.getTime() + descentMin * 60_000);
        const bottomMin = 250 + Math.round(rand() * 60);
        const offBottom = new Date(onBottom.getTime() + bottomMin * 60_000);
        const onDeck = new Date(offBottom.getTime() + (plan.bottom / 25) * 60_000);
        const dive = tx
          .insert(s.dives)
          .values({
            campaignId: campaign.id,
            number: plan.number,
            objectives: plan.objectives,
            plannedMaxDepth: Math.ceil((plan.bottom + 30) / 10) * 10,
            plannedStartAt: launch,
            launchAt: launch,
            onBottomAt: onBottom,
            offBottomAt: offBottom,
            onDeckAt: onDeck,
          })
          .returning()
          .get();

        const order = shuffled(pool, rand);
        for (let i = 0; i < plan.entries; i++) {
          const template = order[i % order.length]!;
          const minute = (bottomMin * (i + 0.5)) / plan.entries + rand() * 4;
          const observedAt = new Date(onBottom.getTime() + minute * 60_000 + Math.round(rand() * 59_000) + Math.round(rand() * 999));
          const depth = Math.round((plan.bottom - 25 + rand() * 30) * 10) / 10;
          const lat = values.datumLat + (rand() - 0.5) * 0.0008;
          const lon = values.datumLon + (rand() - 0.5) * 0.001;
          const temperature = Math.round((10.6 + rand() * 0.6) * 100) / 100;
          // A few entries per dive carry values typed in; the others are stamped from the demo log.
          const typed =
            i % 4 === 1 && i < 10
              ? ({ depth, depthSource: 'manual', lat, lon, positionSource: 'manual', temperature, temperatureSource: 'manual' } as const)
              : {};
          const obs = tx
            .insert(s.observations)
            .values({
              diveId: dive.id,
              campaignId: campaign.id,
              authorId: ids[template.by],
              observedAt,
              kind: template.kind,
              title: template.title,
              note: template.note,
              ...typed,
              createdAt: new Date(observedAt.getTime() + 20_000),
              updatedAt: new Date(observedAt.getTime() + 20_000),
            })
            .returning()
            .get();
          for (const tag of template.tags) {
            const tagId = tagIds.get(tag);
            if (tagId) tx.insert(s.observationTags).values({ observationId: obs.id, tagId }).run();
          }
          tx.insert(s.observationRevisions)
            .values({
              observationId: obs.id,
              version: 1,
              action: 'created',
              snapshot: { title: obs.title, kind: obs.kind, note: obs.note, observedAt: obs.observedAt.toISOString(), tags: template.tags },
              editedBy: obs.authorId,
              editedAt: obs.createdAt,
            })
            .run();
          const ident = template.identification;
          if (ident) {
            const verified = ident.verifiedBy && ident.status;
            tx.insert(s.identifications)
              .values({
                observationId: obs.id,
                scientificName: ident.name,
                taxonRank: ident.rank,
                qualifier: ident.qualifier ?? null,
                confidence: ident.qualifier ? 'medium' : 'high',
                identifiedBy: ids[template.by],
                verificationStatus: verified ? ident.status : 'unverified',
                verifiedBy: verified ? ids[ident.verifiedBy!] : null,
                verifiedAt: verified ? new Date(observedAt.getTime() + 86_400_000) : null,
                verificationNote:
                  ident.status === 'disputed' ? 'Tail shape on the still fits a cusk-eel better; check the next dive.' : null,
                updatedAt: obs.createdAt,
              })
              .run();
          }
          if (template.find) {
            findCount++;
            tx.insert(s.finds)
              .values({
                observationId: obs.id,
                campaignId: campaign.id,
                findNumber: `${findPrefix}-${String(findCount).padStart(3, '0')}`,
                ...template.find,
              })
              .run();
            if (template.find.state === 'recovered') {
              const aboard = new Date(onDeck.getTime() + 15 * 60_000);
              tx.insert(s.custodyEvents)
                .values([
                  {
                    observationId: obs.id,
                    holder: 'Bram Ostrander',
                    since: aboard,
                    location: 'Wet lab, tank 2 (fresh sea water)',
                    container: `Tray ${findCount}`,
                    recordedBy: ids.archaeologist,
                  },
                  {
                    observationId: obs.id,
                    holder: 'Ship conservator',
                    since: new Date(aboard.getTime() + 2 * 3600_000),
                    location: 'Conservation store, wet',
                    container: `Sealed bag ${findPrefix}-${findCount}`,
                    note: 'Kept wet; desalination to start ashore.',
                    recordedBy: ids.archaeologist,
                  },
                ])
                .run();
            }
          }
          total++;
        }
      }
    };

    makeCampaign(
      {
        name: 'Varn Shoal 2026',
        siteName: 'Varn Shoal merchant wreck',
        datumLat: 36.145,
        datumLon: -7.432,
        permitRef: 'VS-2026-PERMIT-07 (invented)',
        vessel: 'RV Morrow Tide',
        vehicle: 'ROV Skerry (rated 1,000 m)',
        startDate: '2026-05-10',
        endDate: '2026-05-18',
        timeZone: 'Europe/Lisbon',
        allowFreeTags: true,
      },
      [
        ['lead', 'lead'],
        ['archaeologist', 'scientist'],
        ['biologist', 'scientist'],
        ['pilot', 'pilot'],
        ['guest', 'guest'],
      ],
      plans2026,
      'VS26',
    );
    makeCampaign(
      {
        name: 'Varn Shoal 2024',
        siteName: 'Varn Shoal merchant wreck',
        datumLat: 36.145,
        datumLon: -7.432,
        permitRef: 'VS-2024-PERMIT-02 (invented)',
        vessel: 'RV Morrow Tide',
        vehicle: 'ROV Skerry (rated 1,000 m)',
        startDate: '2024-06-01',
        endDate: '2024-06-07',
        timeZone: 'Europe/Lisbon',
        allowFreeTags: true,
      },
      [
        ['lead', 'lead'],
        ['archaeologist', 'scientist'],
        ['biologist', 'scientist'],
        ['pilot', 'pilot'],
      ],
      plans2024,
      'VS24',
    );
  });
  seedTelemetry(db);
  return { seeded: true, observations: total };
}
