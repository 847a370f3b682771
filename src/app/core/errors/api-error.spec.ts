import { HttpErrorResponse } from '@angular/common/http';
import { apiErrorOf, isHandledByCaller } from './api-error';

describe('apiErrorOf', () => {
  it('reads code, message and details.field from the API error body', () => {
    const err = new HttpErrorResponse({
      status: 400,
      error: { error: { code: 'invalid', message: 'Use at least 10 characters.', details: { field: 'password' } } },
    });
    expect(apiErrorOf(err)).toEqual({ status: 400, code: 'invalid', message: 'Use at least 10 characters.', field: 'password' });
  });

  it('falls back to a message of its own when the body is not ours', () => {
    expect(apiErrorOf(new HttpErrorResponse({ status: 0, error: new ProgressEvent('error') })).message).toContain('Cannot reach');
    expect(apiErrorOf(new HttpErrorResponse({ status: 502, error: '<html>Bad gateway</html>' })).message).toContain('server ran into a problem');
    expect(apiErrorOf(new Error('boom')).status).toBe(0);
  });
});

describe('isHandledByCaller', () => {
  it('matches all statuses for true, only the named ones for a list, none for false', () => {
    expect(isHandledByCaller(true, 500)).toBeTrue();
    expect(isHandledByCaller([400, 409], 409)).toBeTrue();
    expect(isHandledByCaller([400, 409], 500)).toBeFalse();
    expect(isHandledByCaller(false, 400)).toBeFalse();
  });
});
