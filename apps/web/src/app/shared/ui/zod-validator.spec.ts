import { FormControl } from '@angular/forms';
import { houseCreateSchema } from '@tierscope/contracts';
import { firstError, zodValidator } from './zod-validator';

describe('zodValidator', () => {
  it('applies the contract rule and shows its message', () => {
    const control = new FormControl(5, zodValidator(houseCreateSchema.shape.tiers));
    expect(firstError(control)).toBe('At most 4 tiers');
    control.setValue(3);
    expect(control.valid).toBe(true);
    expect(firstError(control)).toBeNull();
  });

  it('rejects an unknown time zone', () => {
    const control = new FormControl('Mars/Base', zodValidator(houseCreateSchema.shape.timezone));
    expect(firstError(control)).toContain('time zone');
  });
});
