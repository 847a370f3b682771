import { safeReturnUrl } from './return-url';

describe('safeReturnUrl', () => {
  it('keeps a path of this app', () => {
    expect(safeReturnUrl('/admin/users?page=2')).toBe('/admin/users?page=2');
  });

  it('refuses other sites, protocol-relative links and loops back to sign-in', () => {
    expect(safeReturnUrl('https://elsewhere.example.org/')).toBe('/home');
    expect(safeReturnUrl('//elsewhere.example.org/')).toBe('/home');
    expect(safeReturnUrl('/\\elsewhere.example.org')).toBe('/home');
    expect(safeReturnUrl('/sign-in?returnUrl=x')).toBe('/home');
    expect(safeReturnUrl(undefined)).toBe('/home');
  });
});
