import { describe, expect, it } from 'vitest';
import { escapeHtml, newExceptionsMail, workOrderAssignedMail } from './mail-messages';

describe('mail wording', () => {
  it('puts the product and the farm in the subject, and escapes names in the HTML part', () => {
    const mail = workOrderAssignedMail({
      to: ['crew@x.test'],
      publicUrl: 'https://tierscope.example',
      assignedBy: 'Pat <script>',
      order: {
        id: 7,
        title: 'Feed line <b>row 4</b>',
        farmName: 'North & South',
        houseName: 'House 2',
        row: 4,
        tier: null,
        priority: 'high',
        dueOn: null,
      },
    });
    expect(mail.subject).toBe(
      '[Tierscope · North & South] Work order #7 for you: Feed line <b>row 4</b>',
    );
    expect(mail.html).toContain('Pat &lt;script&gt;');
    expect(mail.html).not.toContain('<script>');
    expect(mail.text).toContain('https://tierscope.example/work-orders/7');
    expect(mail.text).toContain("Local codes and your site's own procedures come first.");
  });

  it('shows exception times on the house clock with its zone', () => {
    const mail = newExceptionsMail({
      to: ['m@x.test'],
      publicUrl: 'https://t.example',
      farmName: 'F',
      houseId: 3,
      houseName: 'H',
      timezone: 'America/Chicago',
      exceptions: [
        {
          id: 1,
          kind: 'shortfall',
          scope: 'row',
          row: 4,
          tier: null,
          ratio: 0.84,
          eggs: 4200,
          expected: 5000,
          pValue: 1e-9,
          // 10:15 UTC = 04:15 in Chicago (UTC−6 in December)
          openedAt: new Date('2026-12-01T10:15:00Z'),
        },
      ],
    });
    expect(mail.subject).toBe('[Tierscope · F] New exception in H');
    // Plain words: thousands separated, how unusual in words, never a p-value.
    expect(mail.text).not.toMatch(/p = |e-\d/);
    expect(mail.text).toContain(
      "Shortfall at row 4 (all tiers): 16 % below expected: 4,200 eggs where 5,000 were expected — far outside this spot's usual day-to-day wobble, since 1 Dec, 04:15 (America/Chicago)",
    );
  });

  it('escapes the five HTML-special characters', () => {
    expect(escapeHtml(`<a href="x">'&'</a>`)).toBe(
      '&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;',
    );
  });
});
