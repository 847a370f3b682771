import { blockersMessage, firstPowerBlockers, GATE_ITEM_KEYS, GATE_NOTICE, gateItem, gateItemsFor, gateStates, isHotChassis, type GateSignatureInput } from '../../api/domain/gates';

const keys = (power: Parameters<typeof gateItemsFor>[0]['power'], hotChassis: boolean | null = null) => gateItemsFor({ power, hotChassis }).map((i): string => i.key);

describe('gate items drawn from the set kind', () => {
  // check-values.md §5 "Safety before first power-up" [SEC: antique-radio hobby FAQ; CP]: every mains
  // set — load connected, X/Y line capacitors, fuse in the hot conductor, sound cord, bring-up through
  // a lamp or variac; filter capacitors discharged is common practice.
  const EVERY_MAINS_SET = ['load-connected', 'filter-caps-discharged', 'line-caps-xy-rated', 'fuse-in-hot-lead', 'mains-cord-and-plug', 'limiter-or-variac-ready'];
  // check-values.md §5: AC/DC and autotransformer sets are hot — worked through an isolation transformer.
  const HOT = ['isolation-transformer', 'controls-insulated', 'chassis-cabinet-insulation'];

  it('gives a transformer set the mains items and no isolation items', () => {
    expect(keys('transformer')).toEqual(EVERY_MAINS_SET);
  });

  for (const power of ['ac-dc', 'autotransformer'] as const) {
    it(`adds the isolation items for an ${power} set (hot by its circuit: check-values.md §5)`, () => {
      expect(keys(power)).toEqual([...EVERY_MAINS_SET, ...HOT]);
      expect(keys('transformer')).not.toContain('isolation-transformer');
    });
  }

  it('follows the author where a transformer chassis is flagged hot, and where an ac-dc chassis is flagged not hot', () => {
    expect(keys('transformer', true)).toContain('isolation-transformer');
    expect(keys('ac-dc', false)).not.toContain('isolation-transformer');
    expect(isHotChassis({ power: 'ac-dc', hotChassis: null })).toBeTrue();
    expect(isHotChassis({ power: 'transformer', hotChassis: null })).toBeFalse();
  });

  it('gives a battery set its supply item instead of the mains items (common practice)', () => {
    const b = keys('battery');
    expect(b).toEqual(['load-connected', 'filter-caps-discharged', 'battery-supply-checked']);
    expect(keys('transformer')).not.toContain('battery-supply-checked');
  });

  it('keeps bench order (the order of GATE_ITEM_KEYS) and unique keys', () => {
    for (const power of ['transformer', 'ac-dc', 'autotransformer', 'battery'] as const) {
      const k = keys(power);
      expect(new Set(k).size).toBe(k.length);
      expect([...k].sort((a, b) => (GATE_ITEM_KEYS as readonly string[]).indexOf(a) - (GATE_ITEM_KEYS as readonly string[]).indexOf(b))).toEqual(k);
    }
  });

  it('finds an item by key and nothing for an unknown key', () => {
    expect(gateItem('fuse-in-hot-lead')?.title).toContain('hot lead');
    expect(gateItem('not-an-item')).toBeUndefined();
  });
});

describe('gate cautions (DESIGN.md §2 "a gate is a record, not a certification"; §5 cautions)', () => {
  const all = GATE_ITEM_KEYS.map((k) => gateItem(k)!);

  it('every caution defers to local codes and licensed practice', () => {
    for (const i of all) expect(i.caution).withContext(i.key).toMatch(/local electrical codes and licensed practice/);
    expect(GATE_NOTICE).toMatch(/local electrical codes/);
    expect(GATE_NOTICE).toMatch(/licensed practice/);
  });

  it('no text calls a set "safe" (the word "safety" in a class name is a trade term and allowed)', () => {
    for (const i of all) {
      expect(`${i.title} ${i.caution}`).withContext(i.key).not.toMatch(/\bsafe\b|\bsafely\b|\bcertif/i);
    }
    expect(GATE_NOTICE).toMatch(/not a certification/);
  });

  it('says a variac gives no isolation (check-values.md §5: a variac is usually an autotransformer)', () => {
    expect(gateItem('limiter-or-variac-ready')!.caution).toMatch(/no isolation/);
    expect(gateItem('isolation-transformer')!.caution).toMatch(/variac is not one/);
  });

  it('names a source for every item', () => {
    for (const i of all) expect(i.source.length).withContext(i.key).toBeGreaterThan(10);
  });
});

describe('gate states and first-power blockers', () => {
  const items = gateItemsFor({ power: 'transformer', hotChassis: null });
  const rec = (id: number, itemKey: string, action: 'signed' | 'reopened'): GateSignatureInput<string> => ({ id, itemKey, action, note: '', by: 'tech', at: `2026-01-0${id}T10:00:00Z` });

  it('an item is open until signed, closed when signed, open again after a reopen (the newest record counts)', () => {
    const s1 = gateStates(items, [rec(1, 'load-connected', 'signed')]);
    expect(s1.find((s) => s.key === 'load-connected')!.open).toBeFalse();
    expect(s1.find((s) => s.key === 'fuse-in-hot-lead')!.open).toBeTrue();
    const s2 = gateStates(items, [rec(2, 'load-connected', 'reopened'), rec(1, 'load-connected', 'signed')]);
    expect(s2.find((s) => s.key === 'load-connected')!.open).toBeTrue();
    expect(s2.find((s) => s.key === 'load-connected')!.latest!.id).toBe(2);
  });

  it('ignores records of an item not on the set list', () => {
    const s = gateStates(items, [rec(1, 'isolation-transformer', 'signed')]);
    expect(s.map((x) => x.key)).not.toContain('isolation-transformer');
  });

  it('blocks first power on every open item and every open lifted lead, and on nothing once all are closed', () => {
    const open = gateStates(items, [rec(1, 'load-connected', 'signed')]);
    const lead = { id: 7, componentRef: 'R12', end: 1 as const, node: 'V3.7' };
    const blockers = firstPowerBlockers(open, [lead]);
    expect(blockers.filter((b) => b.kind === 'gate-item').length).toBe(items.length - 1);
    expect(blockers.filter((b) => b.kind === 'lifted-lead')).toEqual([{ kind: 'lifted-lead', leadId: 7, componentRef: 'R12', end: 1, node: 'V3.7' }]);
    const msg = blockersMessage(blockers);
    expect(msg).toContain('R12');
    expect(msg).toContain('Fuse in the hot lead');

    const allSigned = gateStates(items, items.map((i, n) => rec(n + 1, i.key, 'signed')));
    expect(firstPowerBlockers(allSigned, [])).toEqual([]);
    expect(firstPowerBlockers(allSigned, [lead]).length).toBe(1);
  });
});
