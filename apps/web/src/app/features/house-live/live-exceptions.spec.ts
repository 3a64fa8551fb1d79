import { exceptionView as exception } from '../../../testing/fixtures';
import { withLiveException } from './house-live-store';

describe('withLiveException (the house page follows exception messages without reading the list again)', () => {
  it('adds a new exception first', () => {
    const list = withLiveException([exception(1)], exception(2));
    expect(list.map((e) => e.id)).toEqual([2, 1]);
  });

  it('replaces one that changed where it stands', () => {
    const list = withLiveException(
      [exception(3), exception(1)],
      exception(1, { status: 'acknowledged', acknowledgedBy: 'Sam' }),
    );
    expect(list.map((e) => [e.id, e.status])).toEqual([
      [3, 'open'],
      [1, 'acknowledged'],
    ]);
  });

  it('drops one that closed', () => {
    const list = withLiveException(
      [exception(3), exception(1)],
      exception(3, { status: 'closed', closeReason: 'recovered' }),
    );
    expect(list.map((e) => e.id)).toEqual([1]);
  });
});
