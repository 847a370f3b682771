import { readNominal } from './nominal-entry';

describe('readNominal', () => {
  it('reads values as typed, keeping the text', () => {
    expect(readNominal('470k')).toEqual(jasmine.objectContaining({ ok: true, nominal: { ohms: 470000, text: '470k' }, display: '470 kΩ' }));
    // IEC 60062 clause 4: the letter stands for the decimal point.
    expect(readNominal('4K7')).toEqual(jasmine.objectContaining({ ok: true, nominal: { ohms: 4700, text: '4K7' } }));
    // IEC 60062 clause 5: J after a complete value is ±5 %.
    expect(readNominal('4K7J')).toEqual(jasmine.objectContaining({ ok: true, tolerancePct: 5 }));
  });

  it('reads colour bands (IEC 60062: brown black red gold = 1 kΩ ±5 %) and short colour names', () => {
    const r = readNominal('brown black red gold');
    expect(r).toEqual(jasmine.objectContaining({ ok: true, nominal: { ohms: 1000, text: 'brown black red gold' }, tolerancePct: 5 }));
    expect(readNominal('yel vio yel sil')).toEqual(jasmine.objectContaining({ ok: true, tolerancePct: 10 }));
  });

  it('reads the states open and short', () => {
    expect(readNominal('open')).toEqual(jasmine.objectContaining({ ok: true, nominal: { state: 'open' } }));
    expect(readNominal('short')).toEqual(jasmine.objectContaining({ ok: true, nominal: { state: 'short' } }));
  });

  it('refuses what the notation refuses, with its reason', () => {
    const bad = readNominal('2m2');
    expect(bad.ok).toBeFalse();
    expect(!bad.ok && bad.message).toContain('lower-case m');
    const twice = readNominal('4kk7');
    expect(twice.ok).toBeFalse();
    expect(readNominal('').ok).toBeFalse();
  });

  it('refuses a reading state that is not a nominal (OL), and a bad colour band', () => {
    const ol = readNominal('OL');
    expect(ol.ok).toBeFalse();
    expect(!ol.ok && ol.message).toContain('not a nominal');
    // Gold is no digit colour (IEC 60062 colour table).
    expect(readNominal('gold black red gold').ok).toBeFalse();
  });
});
