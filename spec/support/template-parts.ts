import type { Component } from '../../api/domain/template-format';

/** A component of a small hand-made template document: defaults for every field the specs leave out. */
export function part(ref: string, kind: Component['kind'], a: string, b: string, nominal: Component['nominal'], extra: Partial<Component> = {}): Component {
  return {
    key: `c-${ref.toLowerCase()}`,
    ref,
    kind,
    stageKey: 'st-1',
    nodes: [a, b],
    wiper: null,
    nominal,
    tolerancePct: kind === 'wire' ? null : 10,
    ratedWatts: null,
    ratedVolts: null,
    voltsAcross: null,
    critical: null,
    fuseRole: false,
    mainsSide: false,
    nonLinear: false,
    valueSource: 'schematic',
    capacitor: null,
    note: '',
    ...extra,
  };
}
