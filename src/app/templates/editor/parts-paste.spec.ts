import { smallDocument, TUBE_TYPES } from './editor-testing';
import { previewParts, readCapacitance, readRating, splitCells } from './parts-paste';

describe('previewParts (a pasted parts list)', () => {
  it('reads good rows copied from a spreadsheet (tabs), skipping the header row', () => {
    const text = ['Ref\tValue\tTolerance\tRating\tKind\tNode a\tNode b', 'R10\t4K7\t\t1W\t\tV1.1\tchassis', 'R11\tyellow violet yellow silver\t\t½\tcarbon\tV1.2\tB+1', 'C5\t0.05\t\t400V\t\tV1.7\tAVC'].join('\n');
    const p = previewParts(text, smallDocument(), TUBE_TYPES);
    expect(p.header).toBeTrue();
    expect(p.good).toBe(3);
    expect(p.bad).toBe(0);
    const [r10, r11, c5] = p.rows;
    expect(r10.line).toBe(2);
    expect(r10.part!.nominal).toEqual({ ohms: 4700, text: '4K7' });
    expect(r10.part!.kind).toBe('carbon-composition'); // from the reference
    expect(r10.part!.ratedWatts).toBe(1);
    expect(r10.reading).toBe('4.7 kΩ');
    // IEC 60062: yellow 4, violet 7, yellow ×10⁴, silver ±10 % → 470 kΩ ±10 %.
    expect(r11.part!.nominal).toEqual({ ohms: 470000, text: 'yellow violet yellow silver' });
    expect(r11.part!.tolerancePct).toBe(10);
    expect(r11.part!.ratedWatts).toBe(0.5);
    // A bare capacitance is µF, as parts lists of the era print it (common practice).
    expect(c5.part!.kind).toBe('capacitor');
    expect(c5.part!.capacitor).toEqual({ uF: 0.05, workingVolts: 400, dielectric: 'paper', polarised: false, can: null, safetyClass: null, lineConnected: false });
    expect(c5.part!.nominal).toEqual({ state: 'open' });
    expect(c5.newJunctions).toEqual(['AVC']);
  });

  it('reads CSV with quotes and takes the first line as data when it is not a header', () => {
    const p = previewParts('R20,"4,7k",,,,V1.1,chassis\nR21, 2.2 MΩ, 20, 0.5, , V1.1, chassis', smallDocument(), TUBE_TYPES);
    expect(p.header).toBeFalse();
    expect(p.rows.length).toBe(2);
    // A decimal comma inside quotes stays in its cell: 4,7k is 4.7 kΩ.
    expect(p.rows[0].part!.nominal).toEqual({ ohms: 4700, text: '4,7k' });
    expect(p.rows[1].part!.nominal).toEqual({ ohms: 2.2e6, text: '2.2 MΩ' });
    expect(p.rows[1].part!.tolerancePct).toBe(20);
  });

  it('refuses bad rows with their reasons and adds nothing of them', () => {
    const text = [
      'ref,value,tolerance,rating,kind,node a,node b',
      'R1,470k,10,½,,V1.7,chassis', // R1 is in the template already
      'R30,4kk7,10,½,,V1.7,chassis', // two multiplier letters
      'R31,470k,10,½,,V1.9,chassis', // the 6AV6 has 7 pins
      'R32,470k,10,½,,V2.1,chassis', // there is no V2
      'C9,40,,,,B+1,chassis', // no working volts
      'X1,470k,10,½,,V1.1,chassis', // no kind from X
      'R33,470k,10,½,,chassis,chassis', // a part across one node
      'R34,470k,abc,½,,V1.1,chassis', // tolerance not a percentage
      'R35,470k,10,½,,V1.1,chassis', // good
    ].join('\n');
    const p = previewParts(text, smallDocument(), TUBE_TYPES);
    expect(p.good).toBe(1);
    expect(p.bad).toBe(8);
    const why = (ref: string) => p.rows.find((r) => r.cells[0] === ref)!.problems.join(' | ');
    expect(why('R1')).toContain('R1 is already in the template');
    expect(why('R30')).toContain('4kk7');
    expect(why('R31')).toContain('has no pin 9');
    expect(why('R32')).toContain('there is no socket V2');
    expect(why('C9')).toContain('working volts');
    expect(why('X1')).toContain('name the kind');
    expect(why('R33')).toContain("both nodes are 'chassis'");
    expect(why('R34')).toContain("tolerance 'abc'");
    expect(p.rows.find((r) => r.cells[0] === 'R35')!.part).not.toBeNull();
    for (const r of p.rows.filter((x) => x.problems.length)) expect(r.part).toBeNull();
  });

  it('refuses a reference repeated inside the paste, naming the line it is already on', () => {
    const p = previewParts('R40,1k,,,,V1.1,chassis\nR40,2k,,,,V1.1,chassis', smallDocument(), TUBE_TYPES);
    expect(p.rows[0].part).not.toBeNull();
    expect(p.rows[1].problems).toContain('R40 is already in line 1');
  });

  it('splits cells on tabs when the line has one, else on commas outside quotes', () => {
    expect(splitCells('R1\t4,7k\tx')).toEqual(['R1', '4,7k', 'x']);
    expect(splitCells('R1, "a, b" ,c')).toEqual(['R1', 'a, b', 'c']);
  });

  it('reads capacitances and ratings as parts lists write them', () => {
    expect(readCapacitance('40 µF')).toEqual({ uF: 40 });
    expect(readCapacitance('100pF')).toEqual({ uF: 0.0001 });
    expect(readCapacitance('4.7nF')).toEqual({ uF: 0.0047 });
    expect(readCapacitance('.047 mfd')).toEqual({ uF: 0.047 });
    expect('message' in readCapacitance('4k7')).toBeTrue();
    expect(readRating('1/2')).toEqual({ watts: 0.5, volts: null });
    expect(readRating('450 WV')).toEqual({ watts: null, volts: 450 });
    expect('message' in readRating('lots')).toBeTrue();
  });
});
