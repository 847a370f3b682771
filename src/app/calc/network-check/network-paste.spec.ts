import { parsePastedEdges, rowsAsText } from './network-paste';
import { WORKED_EXAMPLE } from './worked-example';

describe('parsePastedEdges', () => {
  it('reads comma-separated lines, skipping a header, comments and blank lines', () => {
    const lines = parsePastedEdges('id, a, b, ohms, kind, tol\n# screen divider\n\nR7, V1.6, chassis, 220k, carbon-composition, 10\nC4, V1.6, chassis, , capacitor');
    expect(lines.map((l) => l.line)).toEqual([4, 5]);
    expect(lines[0].edge).toEqual({ id: 'R7', a: 'V1.6', b: 'chassis', ohms: 220000, kind: 'carbon-composition', tolerancePct: 10 });
    // A capacitor is open at DC: no ohms needed, it is left out of the network.
    expect(lines[1].edge).toEqual({ id: 'C4', a: 'V1.6', b: 'chassis', ohms: 0, kind: 'capacitor' });
    expect(lines.every((l) => l.problems.length === 0)).toBeTrue();
  });

  it('splits on tabs when a line has one, so a decimal comma reads', () => {
    const [line] = parsePastedEdges('R3\tV2.5\tchassis\t4,7k\t\t5');
    expect(line.edge).toEqual({ id: 'R3', a: 'V2.5', b: 'chassis', ohms: 4700, tolerancePct: 5 });
    // With commas the same value splits into too many cells, and the line says so.
    const [bad] = parsePastedEdges('R3, V2.5, chassis, 4,7k, , 5');
    expect(bad.edge).toBeNull();
    expect(bad.problems.join(' ')).toContain('7 cells');
  });

  it('names each problem: unreadable ohms, unknown kind, a node joined to itself, a repeated id', () => {
    const lines = parsePastedEdges('R1, A, B, 4kk7\nR2, A, B, 10k, carbon, 10\nR3, A, A, 1k\nR4, A, B, 1k\nR4, B, C, 2k');
    expect(lines[0].problems[0]).toContain("ohms: '4kk7': two multiplier letters");
    expect(lines[1].problems[0]).toContain("kind: 'carbon' is not a kind");
    expect(lines[2].problems[0]).toContain('joins A to itself');
    expect(lines[3].problems).toEqual([]);
    expect(lines[4].problems).toEqual(['R4 is already on line 4']);
    expect(lines[4].edge).toBeNull();
  });

  it('writes rows back as text that reads again to the same edges', () => {
    const again = parsePastedEdges(rowsAsText(WORKED_EXAMPLE.rows));
    expect(again.length).toBe(WORKED_EXAMPLE.rows.length);
    expect(again.every((l) => l.problems.length === 0)).toBeTrue();
    expect(again.map((l) => l.row)).toEqual([...WORKED_EXAMPLE.rows]);
  });
});
