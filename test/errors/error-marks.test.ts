import { describe, expect, test } from 'vitest';
import { isParameterError, isUserError, ParameterError, UserError } from '../../src/errors.js';

/**
 * The command line's front and each command are separate bundles, each with
 * its own copy of src/errors.ts; the front tells a command's errors by their
 * marks. A second copy of the module here stands in for a command's.
 */
describe('user errors across copies of the errors module', () => {
  test('a copy\'s UserError and ParameterError are not instances of these classes, but are known by their marks', async () => {
    const copy = (await import('../../src/errors.js?as-another-bundle')) as typeof import('../../src/errors.js');
    expect(copy.UserError).not.toBe(UserError);
    const user = new copy.UserError('bad value');
    const param = new copy.ParameterError('stepEv', 'a positive step [eV]', ['stepEv must be positive']);
    expect(user instanceof UserError).toBe(false);
    expect(isUserError(user)).toBe(true);
    expect(isParameterError(user)).toBe(false);
    expect(isUserError(param)).toBe(true);
    expect(isParameterError(param)).toBe(true);
    // And the other way round.
    expect(copy.isUserError(new UserError('x'))).toBe(true);
    expect(copy.isParameterError(new ParameterError('stepEv', 'a positive step [eV]', ['x']))).toBe(true);
  });

  test('other errors and values are not user errors', () => {
    for (const v of [new Error('x'), new TypeError('x'), { message: 'x' }, null, undefined, 'UserError', Object.assign(new Error('x'), { name: 'UserError' })]) {
      expect(isUserError(v)).toBe(false);
      expect(isParameterError(v)).toBe(false);
    }
  });
});
