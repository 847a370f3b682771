import { Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MIN_PASSWORD_LENGTH, newPasswordValidators } from '../password-rules';
import { NewPasswordField } from './new-password-field';

@Component({
  imports: [NewPasswordField, ReactiveFormsModule],
  template: `<dm-new-password-field [control]="control" label="New password" />`,
})
class Host {
  readonly control = new FormControl('', { nonNullable: true, validators: newPasswordValidators });
}

describe('NewPasswordField', () => {
  it('hides the password until asked, and shows it on the switch', async () => {
    const fixture = TestBed.createComponent(Host);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    const input = el.querySelector('input') as HTMLInputElement;
    expect(input.type).toBe('password');
    expect(input.autocomplete).toBe('new-password');
    expect(el.querySelector('mat-label')?.textContent).toContain('New password');
    (el.querySelector('button[aria-label="Show password"]') as HTMLButtonElement).click();
    await fixture.whenStable();
    expect(input.type).toBe('text');
  });

  it('explains a too-short password once touched, and says nothing for a long enough one', async () => {
    const fixture = TestBed.createComponent(Host);
    const host = fixture.componentInstance;
    host.control.setValue('short');
    host.control.markAsTouched();
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    expect(el.querySelector('mat-error')?.textContent).toContain(`at least ${MIN_PASSWORD_LENGTH} characters`);
    host.control.setValue('a long enough passphrase');
    await fixture.whenStable();
    expect(el.querySelector('mat-error')).toBeNull();
  });
});
