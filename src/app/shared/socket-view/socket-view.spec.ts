import { TestBed } from '@angular/core/testing';
import { BASE_GEOMETRIES, BASE_NAMES } from '@domain/base-geometry';
import type { TubePin } from '@domain/template-format';
import { SOCKET_VIEWBOX, SocketView, wrapLabel } from './socket-view';

/** A 12AX7 as the seed library has it (noval): pins 1–9. */
const TWELVE_AX7: TubePin[] = [
  { pin: 1, electrode: 'p', label: 'plate (section 2)' },
  { pin: 2, electrode: 'g', label: 'grid (section 2)' },
  { pin: 3, electrode: 'k', label: 'cathode (section 2)' },
  { pin: 4, electrode: 'h', label: 'heater' },
  { pin: 5, electrode: 'h', label: 'heater' },
  { pin: 6, electrode: 'p', label: 'plate (section 1)' },
  { pin: 7, electrode: 'g', label: 'grid (section 1)' },
  { pin: 8, electrode: 'k', label: 'cathode (section 1)' },
  { pin: 9, electrode: 'hct', label: 'heater centre tap' },
];

/** A 6V6GT (octal) with its two NC pins, and an IC pin put on pin 6 for the drawing's sake. */
const OCTAL_WITH_TAGS: TubePin[] = [
  { pin: 1, electrode: 'NC', label: 'no connection' },
  { pin: 2, electrode: 'h', label: 'heater' },
  { pin: 3, electrode: 'p', label: 'plate' },
  { pin: 4, electrode: 'g2', label: 'grid 2 (screen)' },
  { pin: 5, electrode: 'g1', label: 'grid 1' },
  { pin: 6, electrode: 'IC', label: 'internal connection' },
  { pin: 7, electrode: 'h', label: 'heater' },
  { pin: 8, electrode: 'k', label: 'cathode, beam plates' },
];

async function render(base: string, pins: readonly TubePin[], marks: Record<number, 'high' | 'in-band'> = {}) {
  const fixture = TestBed.createComponent(SocketView);
  fixture.componentRef.setInput('base', base);
  fixture.componentRef.setInput('pins', pins);
  fixture.componentRef.setInput('marks', marks);
  await fixture.whenStable();
  return { fixture, el: fixture.nativeElement as HTMLElement };
}

/**
 * A 12BE6 pentagrid converter (7-pin miniature) with long labels; pin functions from memory of the
 * usual data-sheet base diagram: 1 grid 3 (signal), 2 cathode and grid 5, 3–4 heater, 5 plate,
 * 6 grids 2 and 4 (screen), 7 grid 1 (oscillator).
 */
const TWELVE_BE6: TubePin[] = [
  { pin: 1, electrode: 'g3', label: 'grid 3 (signal grid)' },
  { pin: 2, electrode: 'k', label: 'cathode and grid 5 (suppressor)' },
  { pin: 3, electrode: 'h', label: 'heater' },
  { pin: 4, electrode: 'h', label: 'heater' },
  { pin: 5, electrode: 'p', label: 'plate' },
  { pin: 6, electrode: 'g2', label: 'grids 2 and 4 (screen)' },
  { pin: 7, electrode: 'g1', label: 'grid 1 (oscillator grid) of the converter section' },
];

const pinEl = (el: HTMLElement, n: number) => el.querySelector(`g.pin[data-pin="${n}"]`) as SVGGElement;

describe('SocketView', () => {
  it('draws as many pins as each base has, numbered, under the caption "bottom view"', async () => {
    for (const name of BASE_NAMES) {
      const g = BASE_GEOMETRIES[name];
      const pins: TubePin[] = g.pins.map((p) => ({ pin: p.pin, electrode: 'k', label: `electrode ${p.pin}` }));
      const { el } = await render(name, pins);
      const drawn = el.querySelectorAll('g.pin');
      expect(drawn.length).withContext(name).toBe(g.pinCount);
      expect(Array.from(el.querySelectorAll('.pin-number')).map((t) => t.textContent?.trim())).toEqual(g.pins.map((p) => String(p.pin)));
      expect(el.querySelector('figcaption')?.textContent?.trim()).toBe('bottom view');
    }
  });

  it('labels each pin with its electrode and marks NC and IC pins', async () => {
    const { el } = await render('octal', OCTAL_WITH_TAGS);
    expect(pinEl(el, 3).querySelector('.electrode')?.textContent?.trim()).toBe('plate');
    expect(pinEl(el, 3).getAttribute('aria-label')).toBe('pin 3, plate');
    expect(pinEl(el, 1).querySelector('.electrode')?.textContent?.trim()).toBe('NC');
    expect(pinEl(el, 1).getAttribute('aria-label')).toBe('pin 1, NC, no connection');
    expect(pinEl(el, 6).querySelector('.electrode')?.textContent?.trim()).toBe('IC');
    expect(pinEl(el, 6).getAttribute('aria-label')).toContain('not a tie point');
    expect(pinEl(el, 6).classList).toContain('tag-ic');
    // the octal key is drawn
    expect(el.querySelector('rect.key')).not.toBeNull();
    expect(el.querySelector('path.gap')).toBeNull();
  });

  it('draws the gap of a noval base, and the heavier heater pins of an old 4-pin base', async () => {
    const noval = await render('noval', TWELVE_AX7);
    expect(noval.el.querySelector('path.gap')).not.toBeNull();
    expect(noval.el.querySelector('rect.key')).toBeNull();
    const four = await render('large-4', [
      { pin: 1, electrode: 'f', label: 'filament' },
      { pin: 2, electrode: 'p', label: 'plate' },
      { pin: 3, electrode: 'g', label: 'grid' },
      { pin: 4, electrode: 'f', label: 'filament' },
    ]);
    const heavy = Array.from(four.el.querySelectorAll('g.pin.heavy')).map((g) => g.getAttribute('data-pin'));
    expect(heavy).toEqual(['1', '4']);
    const r1 = Number(pinEl(four.el, 1).querySelector('circle')?.getAttribute('r'));
    const r2 = Number(pinEl(four.el, 2).querySelector('circle')?.getAttribute('r'));
    expect(r1).toBeGreaterThan(r2);
  });

  it('shows a verdict mark by glyph and word, never by colour alone', async () => {
    const { el } = await render('noval', TWELVE_AX7, { 6: 'high', 7: 'in-band' });
    expect(pinEl(el, 6).querySelector('.mark')?.textContent?.trim()).toBe('↑ high');
    expect(pinEl(el, 6).getAttribute('aria-label')).toBe('pin 6, plate (section 1), high');
    expect(pinEl(el, 7).querySelector('.mark')?.textContent?.trim()).toBe('✓ in band');
    expect(pinEl(el, 1).querySelector('.mark')).toBeNull();
  });

  it('makes every pin a focusable button and selects it with Enter or Space', async () => {
    const { fixture, el } = await render('noval', TWELVE_AX7);
    const selected: number[] = [];
    fixture.componentInstance.pinSelected.subscribe((p) => selected.push(p.pin));
    const seven = pinEl(el, 7);
    expect(seven.getAttribute('role')).toBe('button');
    expect(seven.getAttribute('tabindex')).toBe('0');
    expect(seven.getAttribute('aria-label')).toBe('pin 7, grid (section 1)');
    seven.dispatchEvent(new KeyboardEvent('keydown', { key: 'Enter', bubbles: true }));
    pinEl(el, 3).dispatchEvent(new KeyboardEvent('keydown', { key: ' ', bubbles: true }));
    pinEl(el, 4).dispatchEvent(new KeyboardEvent('keydown', { key: 'a', bubbles: true }));
    expect(selected).toEqual([7, 3]);
    pinEl(el, 9).dispatchEvent(new MouseEvent('click', { bubbles: true }));
    expect(selected).toEqual([7, 3, 9]);
  });

  it('keeps long labels inside the drawing: wrapped onto a second line, the full words in the aria-label and the title', async () => {
    const { el } = await render('miniature-7', TWELVE_BE6);
    const box = SOCKET_VIEWBOX;
    for (const pin of TWELVE_BE6) {
      const label = pinEl(el, pin.pin).querySelector<SVGTextElement>('.pin-label')!;
      const b = label.getBBox();
      expect(b.x).withContext(`pin ${pin.pin} left edge`).toBeGreaterThanOrEqual(box.x);
      expect(b.x + b.width).withContext(`pin ${pin.pin} right edge`).toBeLessThanOrEqual(box.x + box.width);
      expect(b.y).withContext(`pin ${pin.pin} top`).toBeGreaterThanOrEqual(box.y);
      expect(b.y + b.height).withContext(`pin ${pin.pin} bottom`).toBeLessThanOrEqual(box.y + box.height);
      expect(pinEl(el, pin.pin).querySelector('title')?.textContent).toBe(`pin ${pin.pin}, ${pin.label}`);
    }
    const six = pinEl(el, 6);
    expect(Array.from(six.querySelectorAll('.electrode')).map((t) => t.textContent?.trim())).toEqual(['grids 2 and 4', '(screen)']);
    expect(six.getAttribute('aria-label')).toBe('pin 6, grids 2 and 4 (screen)');
    // Too long for two lines: shortened with an ellipsis; the title keeps every word.
    const seven = Array.from(pinEl(el, 7).querySelectorAll('.electrode')).map((t) => t.textContent?.trim());
    expect(seven.length).toBe(2);
    expect(seven[1]).toMatch(/…$/);
    // A short label stays one line.
    expect(pinEl(el, 5).querySelectorAll('.electrode').length).toBe(1);
  });

  it('wraps a label between words, cuts a word longer than a line, and shortens what does not fit', () => {
    expect(wrapLabel('heater')).toEqual({ lines: ['heater'], shortened: false });
    expect(wrapLabel('grids 2 and 4 (screen)')).toEqual({ lines: ['grids 2 and 4', '(screen)'], shortened: false });
    expect(wrapLabel('abcdefghij', 4, 3)).toEqual({ lines: ['abcd', 'efgh', 'ij'], shortened: false });
    expect(wrapLabel('one two three four', 7, 2)).toEqual({ lines: ['one two', 'three…'], shortened: true });
    expect(wrapLabel('one two three four', 5, 2)).toEqual({ lines: ['one', 'two…'], shortened: true });
  });

  it('says so when the base is unknown, and draws nothing', async () => {
    const { el } = await render('duodecal-x', TWELVE_AX7);
    expect(el.querySelectorAll('g.pin').length).toBe(0);
    expect(el.querySelector('.unknown')?.textContent).toContain('duodecal-x');
  });
});
