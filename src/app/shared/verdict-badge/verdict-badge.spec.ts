import { TestBed } from '@angular/core/testing';
import { VERDICTS, VERDICT_LABELS } from '@domain/words';
import { VERDICT_GLYPHS, VerdictBadge } from './verdict-badge';

describe('VerdictBadge', () => {
  it('gives each verdict its own glyph, so that none rests on colour alone', () => {
    const glyphs = VERDICTS.map((v) => VERDICT_GLYPHS[v]);
    expect(new Set(glyphs).size).toBe(VERDICTS.length);
  });

  it('shows the glyph and the screen word of the verdict', async () => {
    const fixture = TestBed.createComponent(VerdictBadge);
    fixture.componentRef.setInput('verdict', 'near-limit');
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    expect(el.querySelector('.word')?.textContent).toBe(VERDICT_LABELS['near-limit']);
    expect(el.querySelector('mat-icon')?.textContent?.trim()).toBe('adjust');
    expect(el.querySelector('mat-icon')?.getAttribute('aria-hidden')).toBe('true');

    fixture.componentRef.setInput('verdict', 'not-read');
    await fixture.whenStable();
    expect(el.querySelector('.word')?.textContent).toBe('not read');
    expect(el.getAttribute('data-verdict')).toBe('not-read');
  });
});
