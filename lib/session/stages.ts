/**
 * The guided stages of a leveling session, in order, with what each asks of the technician. Shared by the
 * fold (which stage a reading belongs to, what passes), the field view and the coach view.
 */
export const SESSION_STAGES = [
  'prepare',
  'height-check',
  'zero-level',
  'rough-level',
  'twist',
  'middles-down',
  'twist-recheck',
  'bow',
  'spindle-sweep',
  'lock-as-left',
] as const;

export type SessionStage = (typeof SESSION_STAGES)[number];

/** The checklist items of the prepare stage (the per-screw items of other stages are made from the footprint). */
export const PREPARE_ITEMS = [
  { id: 'fixtures-off', label: 'Fixtures, vises and parts off the table' },
  { id: 'table-clean', label: 'Table and level seat wiped clean, no burrs' },
  { id: 'axes-mid', label: 'Axes at mid-travel, machine warmed up as the builder asks' },
  { id: 'instruments-ok', label: 'Level and indicator chosen and within calibration' },
] as const;

/** Checklist item ids for a middle screw brought down to its pad, and for a jam nut locked. */
export const padItem = (screwId: string) => `pad:${screwId}`;
export const jamItem = (screwId: string) => `jam:${screwId}`;

/** Cautions every stage repeats: a machine of several tonnes is being raised. */
export const STANDING_CAUTIONS = [
  'Keep hands and feet clear of pads and screws while the machine is being raised or lowered.',
  'Nobody under or leaning into the machine while screws are turned.',
  'Power isolated and locked out before working inside the enclosure.',
  "The machine builder's instructions, local codes and licensed practice come first; Levelwire only advises.",
] as const;

export interface StageGuide {
  stage: SessionStage;
  title: string;
  /** What to do, in the order to do it. */
  steps: string[];
  /** Where the level or indicator goes, in words (the views also draw it). */
  placement: string;
  /** Cautions particular to the stage, shown above the standing ones. */
  cautions: string[];
}

export const STAGE_GUIDES: Record<SessionStage, StageGuide> = {
  prepare: {
    stage: 'prepare',
    title: 'Prepare',
    steps: [
      'Remove fixtures, vises and parts from the table.',
      'Wipe the table and the level seat clean.',
      'Bring the axes to mid-travel.',
      'Choose the level and the indicator; check their calibration dates.',
    ],
    placement: 'No readings yet.',
    cautions: ['Use the builder’s lifting points only; never lift by the spindle head or covers.'],
  },
  'height-check': {
    stage: 'height-check',
    title: 'Height check',
    steps: ['Measure the height of the base above the floor at each screw.', 'Compare with the builder’s specified height.'],
    placement: 'At each leveling screw, from the floor to the measuring face the builder names.',
    cautions: ['Measure without reaching under the base; use a height gauge from the side.'],
  },
  'zero-level': {
    stage: 'zero-level',
    title: 'Zero the level',
    steps: [
      'Place the level on the table centre and let the bubble settle; read it.',
      'Turn the level 180° on the same spot and read it again.',
      'If the two readings do not agree (sum more than half a division), adjust the vial and repeat.',
    ],
    placement: 'Table centre, on the same marked spot for both readings.',
    cautions: [],
  },
  'rough-level': {
    stage: 'rough-level',
    title: 'Rough level',
    steps: [
      'Read the level across (X) and along (Y) at the table centre.',
      'Raise the low side on the corner screws only; do not lower the high side.',
      'Repeat until both read within tolerance.',
    ],
    placement: 'Table centre: across (X), then along (Y).',
    cautions: ['Middle screws stay clear of their pads until the twist is out.'],
  },
  twist: {
    stage: 'twist',
    title: 'Twist',
    steps: [
      'Read the level across (X) at the front, middle and back of the Y travel.',
      'Raise the low corner at the end where the cross-slope differs.',
      'Repeat until the cross-slope is the same along the travel, within tolerance.',
    ],
    placement: 'Across (X) at the front, middle and back of the Y travel; along (Y) at the centre.',
    cautions: [],
  },
  'middles-down': {
    stage: 'middles-down',
    title: 'Middle screws down',
    steps: ['Bring each middle screw down until it just touches its pad, without lifting the base.', 'Mark each one when it is snug.'],
    placement: 'Watch the level across (X) at the middle: it must not move while a middle screw is brought down.',
    cautions: ['Snug only: a middle screw driven hard lifts the base and undoes the twist.'],
  },
  'twist-recheck': {
    stage: 'twist-recheck',
    title: 'Twist recheck',
    steps: ['Read the level across (X) at the front, middle and back again.', 'Correct on the corner screws if the twist came back.'],
    placement: 'Across (X) at the front, middle and back of the Y travel.',
    cautions: [],
  },
  bow: {
    stage: 'bow',
    title: 'Bow',
    steps: [
      'Read the level along (Y) at five stations along the Y travel.',
      'Move the middle screws in small, equal amounts: raise them if the middle sags, lower them if it humps.',
      'Repeat until the along-slope is the same from front to back, within tolerance.',
    ],
    placement: 'Along (Y) at five stations from the front to the back of the Y travel.',
    cautions: [],
  },
  'spindle-sweep': {
    stage: 'spindle-sweep',
    title: 'Spindle sweep',
    steps: [
      'Mount the indicator in the spindle and sweep a circle on the table.',
      'Zero at the left point; read front, right and back.',
      'Correct with equal moves of the middle screws if the sweep is outside its limit.',
    ],
    placement: 'Indicator on a circle of the sweep diameter (10 in) about the spindle centre, at front, back, left and right.',
    cautions: ['Spindle turned by hand only, with the machine in a safe state; never under power with hands near the table.'],
  },
  'lock-as-left': {
    stage: 'lock-as-left',
    title: 'Lock and as-left',
    steps: [
      'Lock every jam nut without turning the screw.',
      'Take the as-left readings: across (X) at the front, middle and back; along (Y) at five stations; the spindle sweep.',
      'Record the figures; they go in the report.',
    ],
    placement: 'As in twist, bow and sweep.',
    cautions: [
      'Hold the screw while tightening its jam nut, or the level you just reached moves.',
      'If an as-left reading fails and a move is sent, loosen that screw’s jam nut first, turn, then lock it again.',
    ],
  },
};

/** The stage after `stage`, or null after the last. */
export function nextStage(stage: SessionStage): SessionStage | null {
  const i = SESSION_STAGES.indexOf(stage);
  return SESSION_STAGES[i + 1] ?? null;
}
