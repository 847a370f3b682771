/**
 * Safety gates (DESIGN.md §2 "safety gates", §5 cautions; issue 5 "After the survey"): the
 * checklist a set passes before "ready for first power", drawn from the set's kind, and what blocks
 * first power (an open gate item, an open lifted lead).
 *
 * A gate is a record, not a certification: each item is signed as an append-only record of who and
 * when, and no text here calls a set safe. Every caution defers to local codes and licensed
 * practice.
 *
 * Sources of the items (check-values.md §5 "Safety before first power-up" [SEC: antique-radio
 * hobby FAQ; CP]): line-connected capacitors safety-rated (X across the line, Y line to chassis —
 * the classes of IEC 60384-14, from memory); fuse in the hot conductor ahead of the switch; a hot
 * chassis is decided by the circuit (AC/DC and autotransformer sets are hot: never earthed,
 * polarised plug, worked through an isolation transformer); a variac is usually an autotransformer
 * and isolates nothing; speaker or output load connected before power; bring up through a series
 * lamp or variac. Filter capacitors discharged and verified, knobs and back cover insulated,
 * chassis-to-cabinet insulation, and a battery set's supply checked: common practice, no
 * published source.
 *
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */
import { hotChassisFor, type PowerArrangement } from './template-format';

export const GATE_ITEM_KEYS = [
  'load-connected',
  'filter-caps-discharged',
  'line-caps-xy-rated',
  'fuse-in-hot-lead',
  'mains-cord-and-plug',
  'limiter-or-variac-ready',
  'battery-supply-checked',
  'isolation-transformer',
  'controls-insulated',
  'chassis-cabinet-insulation',
] as const;
export type GateItemKey = (typeof GATE_ITEM_KEYS)[number];

/** Why an item is on a set's list. */
export type GateScope = 'every-set' | 'mains' | 'hot-chassis' | 'battery';

export interface GateItem {
  key: GateItemKey;
  /** What the restorer confirms by signing (our wording). */
  title: string;
  /** Shown with the item: what can hurt, deferring to local codes and licensed practice. */
  caution: string;
  scope: GateScope;
  /** Where the item comes from (a reference or "common practice"). */
  source: string;
}

/** What the gate list depends on: the template's chassis (power arrangement, hot chassis). */
export interface GateSetKind {
  power: PowerArrangement;
  /** Null: follows from the power arrangement (ac-dc, autotransformer ⇒ hot). */
  hotChassis: boolean | null;
}

/** Shown once above the list: a gate records, it does not certify. */
export const GATE_NOTICE =
  'These gates record who checked what, and when. They are not a certification and do not say the set is fit to power or to use. ' +
  'Follow your local electrical codes, and leave mains work to licensed practice where your codes require it.';

const DEFER = 'Follow your local electrical codes and licensed practice.';
const FAQ = 'check-values.md §5 "Safety before first power-up" (antique-radio hobby FAQ, secondary); common practice';

const ITEMS: Readonly<Record<GateItemKey, Omit<GateItem, 'key'>>> = {
  'load-connected': {
    title: 'Speaker or output load connected',
    caution: `An output transformer driven with no load can flash over between its windings. Connect the speaker (or a load resistor of the right impedance and rating) before power. ${DEFER}`,
    scope: 'every-set',
    source: FAQ,
  },
  'filter-caps-discharged': {
    title: 'Filter capacitors discharged and verified with a meter',
    caution: `Filter capacitors can hold a lethal charge long after the set is unplugged. Discharge them through a resistor and confirm with a meter before touching the chassis, and again after every power-up. ${DEFER}`,
    scope: 'every-set',
    source: 'common practice, no published source',
  },
  'line-caps-xy-rated': {
    title: 'Line-connected capacitors are X/Y class',
    caution: `A capacitor across the line must be X class, one from the line to the chassis Y class (IEC 60384-14 classes, from memory). An ordinary paper or film part there can fail short or catch fire. ${DEFER}`,
    scope: 'mains',
    source: `${FAQ}; IEC 60384-14 (from memory)`,
  },
  'fuse-in-hot-lead': {
    title: 'Fuse in the hot lead, ahead of the switch',
    caution: `A fuse in the neutral leaves the set live when it blows. Fit it in the hot conductor ahead of the switch, rated for the set's current. ${DEFER}`,
    scope: 'mains',
    source: FAQ,
  },
  'mains-cord-and-plug': {
    title: 'Mains cord and plug sound (polarised plug where the chassis is hot)',
    caution: `Old rubber and cloth cords crack and short. Replace a cord with brittle or bare insulation; on a hot-chassis set use a polarised plug wired so that the chassis side is the neutral. ${DEFER}`,
    scope: 'mains',
    source: FAQ,
  },
  'limiter-or-variac-ready': {
    title: 'Current limiter (series lamp) or variac ready for the bring-up',
    caution: `Bring the set up slowly through a series lamp or a variac and watch the current. A variac is usually an autotransformer: it gives no isolation from the mains. ${DEFER}`,
    scope: 'mains',
    source: FAQ,
  },
  'battery-supply-checked': {
    title: 'Battery or eliminator voltages and polarity checked',
    caution: `A filament supply connected to the B terminals burns out every filament at once. Check each supply's voltage and polarity against the service data before connecting it. ${DEFER}`,
    scope: 'battery',
    source: 'common practice, no published source',
  },
  'isolation-transformer': {
    title: 'Isolation transformer in use at the bench',
    caution: `The chassis of this set is connected to the mains by its circuit. Work on it only through an isolation transformer (a variac is not one), and never earth the chassis. ${DEFER}`,
    scope: 'hot-chassis',
    source: FAQ,
  },
  'controls-insulated': {
    title: 'Knobs, set screws and back cover insulated before return to the owner',
    caution: `On a hot-chassis set a bare set screw, a missing knob or a missing back cover puts the mains within reach. Fit insulating knobs, covered set screws and the back cover before the set leaves the bench. ${DEFER}`,
    scope: 'hot-chassis',
    source: 'common practice, no published source',
  },
  'chassis-cabinet-insulation': {
    title: 'Chassis insulated from the cabinet and any exposed metal',
    caution: `Mounting bolts, the dial pointer and antenna or phono sockets can touch a hot chassis. Check the insulating washers and the isolating capacitors on external connections. ${DEFER}`,
    scope: 'hot-chassis',
    source: 'common practice, no published source',
  },
};

/** Is the chassis hot: the author's flag where set, else from the power arrangement. */
export function isHotChassis(kind: GateSetKind): boolean {
  return kind.hotChassis ?? hotChassisFor(kind.power);
}

/**
 * The gate items of a set, in bench order: every set's items, the mains items unless the set runs
 * on batteries only, the battery item for a battery set, and the isolation items for a hot chassis
 * (ac-dc, autotransformer, or flagged hot by the author).
 */
export function gateItemsFor(kind: GateSetKind): GateItem[] {
  const battery = kind.power === 'battery';
  const hot = isHotChassis(kind);
  const scopes = new Set<GateScope>(['every-set']);
  if (!battery) scopes.add('mains');
  else scopes.add('battery');
  if (hot) scopes.add('hot-chassis');
  return GATE_ITEM_KEYS.filter((k) => scopes.has(ITEMS[k].scope)).map((key) => ({ key, ...ITEMS[key] }));
}

/** The item of that key (any scope), or undefined. */
export function gateItem(key: string): GateItem | undefined {
  return (GATE_ITEM_KEYS as readonly string[]).includes(key) ? { key: key as GateItemKey, ...ITEMS[key as GateItemKey] } : undefined;
}

export const GATE_ACTIONS = ['signed', 'reopened'] as const;
export type GateAction = (typeof GATE_ACTIONS)[number];

/** One append-only record of a gate item (in the order written). */
export interface GateSignatureInput<P = unknown> {
  id: number;
  itemKey: string;
  action: GateAction;
  note: string;
  by: P;
  at: string;
}

export interface GateItemState<P = unknown> extends GateItem {
  /** The newest record of the item (signed or reopened), or null when never signed. */
  latest: GateSignatureInput<P> | null;
  /** True until signed, and again after a reopen. */
  open: boolean;
}

/** Each item with its newest record; records of items not on the list (a set whose kind changed) are ignored. */
export function gateStates<P>(items: readonly GateItem[], records: readonly GateSignatureInput<P>[]): GateItemState<P>[] {
  const newest = new Map<string, GateSignatureInput<P>>();
  for (const r of records) {
    const had = newest.get(r.itemKey);
    if (!had || r.id > had.id) newest.set(r.itemKey, r);
  }
  return items.map((item) => {
    const latest = newest.get(item.key) ?? null;
    return { ...item, latest, open: latest?.action !== 'signed' };
  });
}

/** An open lifted lead as the blockers need it. */
export interface OpenLeadInput {
  id: number;
  componentRef: string;
  end: 0 | 1;
  node: string;
}

export type FirstPowerBlocker =
  | { kind: 'gate-item'; itemKey: GateItemKey; title: string }
  | { kind: 'lifted-lead'; leadId: number; componentRef: string; end: 0 | 1; node: string };

/** What stands in the way of "ready for first power": open gate items, then open lifted leads. */
export function firstPowerBlockers(states: readonly GateItemState[], openLeads: readonly OpenLeadInput[]): FirstPowerBlocker[] {
  const out: FirstPowerBlocker[] = [];
  for (const s of states) if (s.open) out.push({ kind: 'gate-item', itemKey: s.key, title: s.title });
  for (const l of openLeads) out.push({ kind: 'lifted-lead', leadId: l.id, componentRef: l.componentRef, end: l.end, node: l.node });
  return out;
}

/** The refusal's message: names each blocker. */
export function blockersMessage(blockers: readonly FirstPowerBlocker[]): string {
  const gates = blockers.filter((b) => b.kind === 'gate-item').map((b) => (b as { title: string }).title);
  const leads = blockers
    .filter((b): b is Extract<FirstPowerBlocker, { kind: 'lifted-lead' }> => b.kind === 'lifted-lead')
    .map((b) => `${b.componentRef} (end at ${b.node})`);
  const parts: string[] = [];
  if (gates.length) parts.push(`${gates.length === 1 ? 'a gate item is' : `${gates.length} gate items are`} not signed: ${gates.join('; ')}`);
  if (leads.length) parts.push(`${leads.length === 1 ? 'a lifted lead is' : `${leads.length} lifted leads are`} not re-soldered: ${leads.join(', ')}`);
  return `Not recorded as ready for first power: ${parts.join('; and ')}.`;
}

/** The item key under which "ready for first power" is recorded among the gate records. */
export const FIRST_POWER_KEY = 'first-power';

/** GET /api/sets/:id/gates (P: the person shape, L: the lifted-lead shape). */
export interface GatesView<P = unknown, L = unknown> {
  notice: string;
  kind: { power: PowerArrangement; hotChassis: boolean };
  items: GateItemState<P>[];
  /** Every record in the order written (signatures, reopenings, first power): the audit trail. */
  history: GateSignatureInput<P>[];
  openLiftedLeads: L[];
  firstPower: { at: string; by: P | null; note: string } | null;
  /** Empty when first power may be recorded (and it has not been yet). */
  blockers: FirstPowerBlocker[];
}
