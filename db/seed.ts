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

/**
 * The 2026 campaign's watch plan: three teams each standing two four-hour watches a day, four on
 * and eight off (common practice at sea), in the campaign's display zone. The guest is ashore and
 * stands none. Names and times are the demo's own.
 */
const watchPlan2026: { name: string; start: string; end: string; by: PersonKey[] }[] = [
  { name: 'Small hours', start: '00:00', end: '04:00', by: ['archaeologist'] },
  { name: 'Dawn', start: '04:00', end: '08:00', by: ['biologist'] },
  { name: 'Morning', start: '08:00', end: '12:00', by: ['lead', 'pilot'] },
  { name: 'Afternoon', start: '12:00', end: '16:00', by: ['archaeologist'] },
  { name: 'Evening', start: '16:00', end: '20:00', by: ['biologist'] },
  { name: 'Night', start: '20:00', end: '00:00', by: ['lead', 'pilot'] },
];

type Template = {
  kind: ObservationKind;
  by: PersonKey;
  title: string;
  note: string;
  tags: string[];
  /** A proposed name, and who verified it (if anyone). */
  identification?: {
    name: string;
    rank: 'species' | 'genus' | 'family' | 'order' | 'class';
    qualifier?: 'cf.' | 'aff.' | 'sp.' | 'indet.';
    verifiedBy?: PersonKey;
    status?: 'verified' | 'disputed';
  };
  /** A registered find, and for a recovered one who has held it. */
  find?: { objectType: string; material: string; condition: string; state: 'in-situ' | 'recovered' };
};

const entry = (
  kind: ObservationKind,
  by: PersonKey,
  title: string,
  tags: string[],
  note: string,
  extra: Partial<Template> = {},
): Template => ({
  kind,
  by,
  title,
  tags,
  note,
  ...extra,
});

/**
 * Each dive's entries in the order they were logged, every title once in its campaign. VS-01
 * finds the wreck's outline, VS-02 works the cargo mound, VS-03 the stern, VS-04 the keel.
 */
const entries2026: Record<string, Template[]> = {
  'VS-01': [
    entry(
      'operations',
      'pilot',
      'Laser scaler checked',
      ['equipment'],
      'Parallel lasers at 10 cm confirmed on the calibration board before descent.',
    ),
    entry(
      'environment',
      'pilot',
      'Seabed in sight, fine grey mud',
      ['sediment'],
      'Soft grey mud, a thin brown layer on top; the skids sink a few centimetres.',
    ),
    entry(
      'archaeology',
      'archaeologist',
      'First timbers out of the gloom, north-east edge',
      ['hull', 'timber'],
      'Two frame ends stand about 40 cm proud of the mud on the north-east side. Heading along them.',
    ),
    entry(
      'biology',
      'biologist',
      'Rust-coloured concretions on the bow',
      ['concretion', 'hull'],
      'Iron-oxidising bacterial structures (rust-coloured, drip-shaped concretions) hanging from the\nbow fittings, up to ~15 cm long. Brittle: the thruster wash broke the tip off one.',
    ),
    entry(
      'archaeology',
      'lead',
      'Bow outline traced on the video',
      ['hull', 'mosaic'],
      'The bow outline is now clear on the forward camera: the stem has collapsed to starboard.\nPlan for the next dive: a mosaic line along the keel.',
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Stem post lying to starboard',
      ['hull', 'timber'],
      'The stem lies flat, pointing south-east, its scarf to the keel still visible.',
    ),
    entry(
      'biology',
      'biologist',
      'Microbial mat on the port frames',
      ['microbial-mat', 'hull'],
      'White to pale-orange **microbial mat** draping the exposed port frames, thickest where the\nplanking has gone. Patchy, about 40 % cover over 2 m of frame.\n\n- texture: filamentous, lifts in the thruster wash\n- no visible grazers on it',
    ),
    entry(
      'environment',
      'pilot',
      'Current picking up from the north-east',
      ['current'],
      'Estimated 0.3 kn from the NE, vehicle crabbing to hold station.',
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Hull timber with treenails',
      ['hull', 'timber'],
      'Exposed strake on the port side showing a row of treenails at ~20 cm spacing. Timber surface\neroded, fastenings stand proud.\n\n| feature | value |\n| --- | --- |\n| spacing | ~20 cm |\n| visible length | ~1.8 m |',
    ),
    entry(
      'biology',
      'biologist',
      'Grenadier passing the bow',
      ['fish'],
      'Macrourid swimming slowly head-down past the bow, ~40 cm. Out of frame after 6 s.',
      {
        identification: { name: 'Macrouridae', rank: 'family', qualifier: 'indet.' },
      },
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Coarse ware sherds down the port side',
      ['coarse-ware', 'sediment'],
      'A fan of grey coarse ware sherds runs 3 m downslope from the port side, none bigger than a palm.',
    ),
    entry(
      'operations',
      'pilot',
      'Position fix lost for about a minute',
      ['equipment'],
      'Acoustic positioning dropped out for ~60 s near the stern; positions in that window are\ninterpolated.',
    ),
    entry(
      'biology',
      'guest',
      'Brittle stars on the sediment apron',
      ['echinoderm', 'sediment'],
      'Dense brittle stars on the sediment around the cargo mound — from the feed it looks like\n10–20 per frame. Worth a count on the mosaic.',
      { identification: { name: 'Ophiuroidea', rank: 'class', qualifier: 'indet.' } },
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Stern found, about 31 m from the stem',
      ['hull', 'stern'],
      'Sternpost upright but leaning aft; the run of frames between bow and stern is unbroken on the port side.',
    ),
    entry(
      'biology',
      'biologist',
      'Pencil urchin on a stern frame',
      ['echinoderm', 'stern'],
      'One slate-pencil urchin, spines thick and blunt, grazing the frame top. ~8 cm test.',
      {
        identification: { name: 'Cidaris cidaris', rank: 'species', qualifier: 'cf.' },
      },
    ),
    entry(
      'environment',
      'biologist',
      'Ripple marks on the sediment apron',
      ['sediment', 'current'],
      'Small ripple marks, crests aligned NW–SE, on the apron west of the wreck.',
    ),
    entry(
      'archaeology',
      'lead',
      'Wreck outline closed, roughly 31 by 9 m',
      ['hull', 'mosaic'],
      'Bow, stern and both sides now seen. The mound sits slightly forward of amidships.',
    ),
    entry(
      'operations',
      'pilot',
      'Leaving bottom, thrusters clear of mud',
      ['equipment'],
      'Lifted off vertically to keep the mud down; no line or cable on the wreck.',
    ),
  ],
  'VS-02': [
    entry(
      'operations',
      'pilot',
      'Camera check on the way down, all four lamps on',
      ['equipment'],
      'Forward HD, down camera and both lamp pairs checked at 300 m.',
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Amphora with both handles, in situ',
      ['amphora', 'cargo'],
      'Complete amphora lying on its side at the edge of the cargo mound, both handles intact,\nmouth to the north-east. **Left in situ.**',
      { find: { objectType: 'amphora', material: 'ceramic', condition: 'complete, both handles', state: 'in-situ' } },
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Stack of coarse ware bowls',
      ['coarse-ware', 'cargo'],
      'At least six coarse ware bowls nested in a stack, partly buried, amidships. Rims chipped,\nno glaze visible.',
      { find: { objectType: 'bowl stack', material: 'coarse ware', condition: 'rims chipped', state: 'in-situ' } },
    ),
    entry(
      'biology',
      'biologist',
      'Squat lobster in an amphora mouth',
      ['crustacean', 'amphora'],
      '*Munida* sp. sheltering in the mouth of an amphora in the cargo mound; retreated when the\nlights came close.',
      { identification: { name: 'Munida', rank: 'genus', qualifier: 'sp.' } },
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Amphora toe sticking out of the sediment',
      ['amphora', 'sediment'],
      'Only the toe visible, angled ~30° from vertical. Possibly a second layer of cargo below.',
    ),
    entry(
      'biology',
      'biologist',
      'Anemone on an amphora neck',
      ['amphora'],
      'Solitary anemone (tentacles ~5 cm) on the neck of a toppled amphora. Pale, translucent.',
    ),
    entry(
      'environment',
      'pilot',
      'Visibility down to about 3 m',
      ['visibility'],
      'Resuspended sediment after working near the mound; waiting for the current to clear it.',
    ),
    entry(
      'archaeology',
      'archaeologist',
      'A second layer of amphorae under the first',
      ['amphora', 'cargo'],
      'Where the mound is scoured, shoulders of a lower row show, laid the other way.',
    ),
    entry(
      'biology',
      'biologist',
      'Transect T1 started along the mound',
      ['sediment'],
      'Down camera on, 1.5 m altitude, heading 070 along the mound’s north flank.',
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Stamped amphora handle, letters worn',
      ['amphora'],
      'Rectangular stamp on the upper handle; three letters, too worn to read on video.',
      {
        find: { objectType: 'amphora handle', material: 'ceramic', condition: 'stamp partly legible', state: 'in-situ' },
      },
    ),
    entry(
      'biology',
      'guest',
      'Forkbeard resting between two amphorae',
      ['fish', 'amphora'],
      'Long pelvic rays trailing on the sediment; did not move for the lights. From the feed ashore.',
      {
        identification: { name: 'Phycis blennoides', rank: 'species', qualifier: 'cf.' },
      },
    ),
    entry(
      'archaeology',
      'lead',
      'Cargo mound about 6 m across',
      ['cargo', 'mosaic'],
      'Highest at the centre, about 1.2 m above the seabed; the slope is steeper to the south.',
    ),
    entry(
      'biology',
      'biologist',
      'Bamboo coral fan on a jar shoulder',
      ['coral', 'amphora'],
      'Jointed, whitish fan ~20 cm high growing from the shoulder of an upright jar.',
      {
        identification: { name: 'Isididae', rank: 'family', qualifier: 'indet.' },
      },
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Coarse ware jug with a strap handle',
      ['coarse-ware', 'cargo'],
      'Squat jug, one strap handle, lying mouth down at the mound’s west end.',
      {
        find: { objectType: 'jug', material: 'coarse ware', condition: 'complete, surface worn', state: 'in-situ' },
      },
    ),
    entry(
      'environment',
      'pilot',
      'Water clearing at slack tide',
      ['visibility', 'current'],
      'The cloud drifted off to the south-west; back to about 8 m.',
    ),
    entry(
      'biology',
      'biologist',
      'Hermit crab in a broken jug neck',
      ['crustacean'],
      'Using a broken jug neck as a shell; pale orange legs, ~4 cm across.',
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Resin lining inside a broken amphora',
      ['amphora', 'cargo'],
      'Dark, glossy lining on the inner wall of a split body sherd; a sample would tell what it held.',
    ),
    entry(
      'biology',
      'biologist',
      'Transect T1 ended after 42 m',
      ['sediment'],
      'Brittle stars and burrows all along; no coral on the mound itself.',
    ),
    entry(
      'operations',
      'pilot',
      'Suction sampler hose kinked and cleared',
      ['equipment'],
      'Lost suction for two minutes; the hose had caught under the tool skid.',
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Ballast stones amidships',
      ['ballast'],
      'Rounded ballast stones, fist to head size, under the collapsed frames amidships.',
    ),
  ],
  'VS-03': [
    entry(
      'operations',
      'pilot',
      'Push-core quiver loaded with six tubes',
      ['equipment', 'sample'],
      'Six 7 cm tubes, numbered PC-1 to PC-6, in the quiver on the starboard skid.',
    ),
    entry(
      'biology',
      'biologist',
      'Cold-water coral colony on the stern rail',
      ['coral', 'stern'],
      'Live colony of *Desmophyllum pertusum*, white polyps extended, roughly 60 × 40 cm, growing\nfrom the stern rail towards the current. Dead framework beneath.',
      { identification: { name: 'Desmophyllum pertusum', rank: 'species', verifiedBy: 'lead', status: 'verified' } },
    ),
    entry(
      'biology',
      'biologist',
      'Glass sponge at the sternpost',
      ['sponge', 'stern'],
      'Vase-shaped hexactinellid sponge, ~25 cm tall, attached at the sternpost base. Two small\nophiuroids in the osculum.',
    ),
    entry(
      'biology',
      'biologist',
      'Conger under the hull timbers',
      ['fish', 'timber'],
      'Large conger eel (est. 1.5 m) in the gap between two hull timbers, head out, facing the\ncurrent. Seen again on the way back along the starboard side.',
      { identification: { name: 'Conger conger', rank: 'species', qualifier: 'cf.', verifiedBy: 'lead', status: 'disputed' } },
    ),
    entry(
      'biology',
      'biologist',
      'Push core of the mat for microbiology',
      ['microbial-mat', 'sample'],
      'Push core **PC-2** through the mat beside the port frames, 12 cm recovery, stored upright in\nthe bio-box. Needs cold storage on deck.',
    ),
    entry(
      'biology',
      'guest',
      'Zigzag coral on the rudder fittings',
      ['coral', 'stern'],
      'Zigzag branches, small colony on the upper rudder fitting. Seen from ashore; please confirm.',
      {
        identification: { name: 'Madrepora oculata', rank: 'species' },
      },
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Rudder fitting still on the sternpost',
      ['stern', 'hull'],
      'An iron strap around the sternpost, heavily concreted, about 60 cm above the mud.',
    ),
    entry(
      'biology',
      'biologist',
      'Second push core, dark sediment under the mat',
      ['microbial-mat', 'sample', 'sediment'],
      'PC-3: black, sulphide-smelling layer (per the deck crew) from 2 cm down. 10 cm recovery.',
    ),
    entry(
      'environment',
      'pilot',
      'Temperature step of 0.3 °C over the stern',
      ['current'],
      'Warmer water on the lee side of the stern for a few metres.',
    ),
    entry(
      'biology',
      'biologist',
      'Rosefish in the lee of the stern',
      ['fish', 'stern'],
      'Red fish with a dark mouth, resting on the mud in the stern’s lee; ~25 cm.',
      {
        identification: { name: 'Helicolenus dactylopterus', rank: 'species' },
      },
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Copper-alloy nails in the stern planking',
      ['hull', 'timber'],
      'Green-stained nail heads in two rows where the planking is lost; square shanks.',
    ),
    entry(
      'biology',
      'biologist',
      'Dead coral rubble under the live colony',
      ['coral', 'sediment'],
      'A 1 m apron of broken coral framework below the stern rail, lightly silted.',
    ),
    entry(
      'biology',
      'guest',
      'Sponge field on the starboard quarter',
      ['sponge'],
      'Dozens of small white sponges on the starboard quarter, none taller than 10 cm.',
    ),
    entry(
      'operations',
      'pilot',
      'Thruster wash lifted the mat, holding off',
      ['microbial-mat', 'visibility'],
      'Backed off 3 m and let it settle before the next core.',
    ),
    entry(
      'biology',
      'biologist',
      'Third push core, thinner mat here',
      ['microbial-mat', 'sample'],
      'PC-4 at the mat’s edge, 8 cm recovery; the mat is only a film here.',
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Broken tiles near the stern, perhaps the galley',
      ['stern'],
      'Flat fired-clay tiles with one burnt face, in a small heap just forward of the sternpost.',
    ),
    entry(
      'biology',
      'biologist',
      'Cup corals on an exposed frame end',
      ['coral', 'hull'],
      'Solitary cup corals, 1–2 cm, a dozen on one frame end.',
      {
        identification: { name: 'Caryophylliidae', rank: 'family', qualifier: 'indet.' },
      },
    ),
    entry(
      'operations',
      'lead',
      'Stern survey done, cores stowed in the bio-box',
      ['sample'],
      'Three cores taken of the six; PC-5 and PC-6 stay for the keel dive.',
    ),
  ],
  'VS-04': [
    entry(
      'operations',
      'pilot',
      'Mosaic line started along the keel',
      ['mosaic'],
      'Altitude 2.5 m, 0.2 kn, downward camera at 2 s interval.',
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Keel exposed for about 4 m amidships',
      ['hull', 'timber'],
      'Scour has cleared the keel’s upper face; limber holes visible in the floors above it.',
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Lead sheathing fragment',
      ['hull'],
      'Folded sheet of lead sheathing, ~30 cm, with nail holes, lying off the starboard quarter.',
      {
        find: { objectType: 'hull sheathing', material: 'lead', condition: 'folded, nail holes', state: 'recovered' },
      },
    ),
    entry(
      'operations',
      'pilot',
      'Mosaic paused for a sediment cloud',
      ['mosaic', 'visibility'],
      'The down camera saw nothing but haze for 40 s; the line resumes from the last good frame.',
    ),
    entry(
      'biology',
      'biologist',
      'Sediment scoop beside the keel',
      ['sediment', 'sample'],
      'Scoop S-1 of the grey mud 1 m off the keel, for grain size and fauna.',
    ),
    entry(
      'archaeology',
      'lead',
      'Mast step found on the keel',
      ['hull', 'timber'],
      'A rectangular mortise in a thickened timber over the keel, a little forward of amidships.',
    ),
    entry(
      'biology',
      'biologist',
      'Long-armed sea star on the mosaic line',
      ['echinoderm'],
      'Eleven thin orange arms raised into the current, disc ~3 cm.',
      {
        identification: { name: 'Brisingida', rank: 'order', qualifier: 'indet.' },
      },
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Coarse ware lid raised for dating',
      ['coarse-ware', 'sample'],
      'Small flat lid with a knob, lifted in the soft jaw and put in basket box 3.',
      {
        find: { objectType: 'lid', material: 'coarse ware', condition: 'complete, knob worn', state: 'recovered' },
      },
    ),
    entry('operations', 'pilot', 'Mosaic line finished, 38 m covered', ['mosaic'], 'Whole keel covered at 2.5 m altitude; 1,140 frames.'),
    entry(
      'biology',
      'guest',
      'Shrimp swarming in the lights over the keel',
      ['crustacean'],
      'A cloud of small red shrimp drawn to the lamps; gone when the lamps were dimmed.',
    ),
    entry('environment', 'pilot', 'Bottom current slackening', ['current'], 'Down to about 0.1 kn; station keeping easy again.'),
    entry(
      'operations',
      'pilot',
      'Sample set in the basket, six items',
      ['sample', 'equipment'],
      'Cores PC-2 to PC-4, scoop S-1, the lid and the sheathing fragment; basket latched.',
    ),
  ],
};

/** The first look, two years earlier: fewer people, a shorter list. */
const entries2024: Record<string, Template[]> = {
  'VS24-01': [
    entry(
      'operations',
      'pilot',
      'Sonar target reached, wreck in view',
      ['equipment'],
      'The side-scan contact is a wreck: timbers and a mound of jars at 606 m.',
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Amphorae heaped in a low mound',
      ['amphora', 'cargo'],
      'Dozens of amphorae, most still in rows; a few broken on top.',
    ),
    entry(
      'biology',
      'biologist',
      'Orange mat over bare timbers',
      ['microbial-mat', 'timber'],
      'Pale orange film over the exposed frames; thinner than expected.',
    ),
    entry(
      'archaeology',
      'archaeologist',
      'Amphora neck with one handle',
      ['amphora'],
      'A neck and one handle standing out of the mound’s east side; left where it lies.',
      {
        find: { objectType: 'amphora neck', material: 'ceramic', condition: 'one handle', state: 'in-situ' },
      },
    ),
    entry(
      'biology',
      'biologist',
      'Small coral colonies at the stern',
      ['coral', 'stern'],
      'Three colonies, none bigger than a hand, on the stern timbers.',
    ),
    entry(
      'environment',
      'pilot',
      'Strong current cuts the bottom time',
      ['current'],
      'About 0.6 kn from the north; the vehicle struggles to hold station over the mound.',
    ),
    entry(
      'archaeology',
      'lead',
      'A merchant wreck, mostly intact: worth a campaign',
      ['hull'],
      'Hull outline, cargo and stern fittings all there. Plan a full campaign.',
    ),
  ],
  'VS24-02': [
    entry(
      'archaeology',
      'archaeologist',
      'Coarse ware bowl, rim intact',
      ['coarse-ware', 'cargo'],
      'One bowl lying open side up at the mound’s edge.',
      {
        find: { objectType: 'bowl', material: 'coarse ware', condition: 'rim intact', state: 'in-situ' },
      },
    ),
    entry('biology', 'biologist', 'Conger in the bow timbers', ['fish', 'timber'], 'A conger eel, head out of a gap in the bow timbers.', {
      identification: { name: 'Conger conger', rank: 'species' },
    }),
    entry(
      'archaeology',
      'archaeologist',
      'Bow fittings under rust-coloured growth',
      ['hull', 'concretion'],
      'Iron fittings at the bow, hidden under drip-shaped rusty growths.',
    ),
    entry('biology', 'biologist', 'Glass sponges along the port side', ['sponge'], 'A line of small vase sponges on the port frames.'),
    entry('environment', 'pilot', 'Visibility good, about 8 m', ['visibility'], 'Clear water, little particle load.'),
    entry(
      'archaeology',
      'archaeologist',
      'Rounded cobbles of ballast under the bow',
      ['ballast'],
      'River-rounded cobbles, so the ballast came from a river mouth.',
    ),
    entry(
      'operations',
      'pilot',
      'Port lamp failed, finished on one lamp',
      ['equipment'],
      'The port lamp tripped at 40 min; the rest of the dive on the starboard pair.',
    ),
  ],
};

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
};

const plans2026: DivePlan[] = [
  {
    number: 'VS-01',
    day: '2026-05-12',
    launch: '18:05',
    objectives: 'Survey the wreck outline; locate bow and stern.',
    bottom: 612,
  },
  {
    number: 'VS-02',
    day: '2026-05-13',
    launch: '17:40',
    objectives: 'Cargo mound: amphorae and coarse ware; first biology transect.',
    bottom: 598,
  },
  {
    number: 'VS-03',
    day: '2026-05-14',
    launch: '18:20',
    objectives: 'Stern: corals and sponges; push cores through the microbial mat.',
    bottom: 584,
  },
  {
    number: 'VS-04',
    day: '2026-05-16',
    launch: '19:00',
    objectives: 'Mosaic line along the keel; recover the sample set.',
    bottom: 605,
  },
];

const plans2024: DivePlan[] = [
  { number: 'VS24-01', day: '2024-06-03', launch: '16:30', objectives: 'First look at the sonar target.', bottom: 606 },
  { number: 'VS24-02', day: '2024-06-05', launch: '17:10', objectives: 'Cargo mound and the bow.', bottom: 601 },
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
/** Seeds the invented demo into an empty database; `watchPlan: false` leaves out the 2026 campaign's watch plan. */
export async function seedDemo(db: Db, options: { watchPlan?: boolean } = {}): Promise<{ seeded: boolean; observations: number }> {
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
      entries: Record<string, Template[]>,
      findPrefix: string,
      watchPlan: typeof watchPlan2026 = [],
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
      if (watchPlan.length > 0) {
        // Set now, so the first handover note is the one at the next change of watch.
        tx.insert(s.watchPlans).values({ campaignId: campaign.id, updatedBy: ids.lead, updatedAt: now }).run();
        watchPlan.forEach((w, position) => {
          const watchId = tx
            .insert(s.watches)
            .values({ campaignId: campaign.id, name: w.name, start: w.start, end: w.end, position })
            .returning({ id: s.watches.id })
            .get().id;
          tx.insert(s.watchMembers)
            .values(w.by.map((key) => ({ watchId, userId: ids[key] })))
            .run();
        });
      }
      const tagIds = new Map<string, string>();
      for (const name of vocabulary2026) {
        tagIds.set(name, tx.insert(s.tags).values({ campaignId: campaign.id, name }).returning().get().id);
      }

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
            // The demo vehicle's two lasers are 10 cm apart.
            laserSpacingCm: 10,
          })
          .returning()
          .get();

        const list = entries[plan.number] ?? [];
        for (const [i, template] of list.entries()) {
          const minute = (bottomMin * (i + 0.5)) / list.length + rand() * 4;
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
      entries2026,
      'VS26',
      options.watchPlan === false ? [] : watchPlan2026,
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
      entries2024,
      'VS24',
    );
  });
  seedTelemetry(db);
  return { seeded: true, observations: total };
}
