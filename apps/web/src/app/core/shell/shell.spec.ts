import type { Role } from '@tierscope/domain';
import { provideHttpClient } from '@angular/common/http';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { signInAs } from '../../../testing/session';
import { Shell } from './shell';

function renderAs(role: Role): HTMLElement {
  signInAs(role);
  TestBed.configureTestingModule({
    imports: [Shell],
    providers: [provideRouter([]), provideHttpClient()],
  });
  const fixture = TestBed.createComponent(Shell);
  fixture.detectChanges();
  return fixture.nativeElement as HTMLElement;
}

const navLabels = (element: HTMLElement) =>
  Array.from(element.querySelectorAll('mat-nav-list a [matListItemTitle]')).map((a) =>
    a.textContent.trim(),
  );

describe('Shell', () => {
  it('offers the Users page and the Mailbox to admins', () => {
    expect(navLabels(renderAs('admin'))).toEqual([
      'Farms',
      'Exceptions',
      'My work',
      'Work orders',
      'Reports',
      'Imports',
      'Unknown counters',
      'Gateways',
      'Users',
      'Mailbox',
    ]);
  });

  it('offers the crew their own work but not the Users page or every work order', () => {
    expect(navLabels(renderAs('crew'))).toEqual(['Farms', 'Exceptions', 'My work']);
  });

  it('offers managers the work orders and reports', () => {
    expect(navLabels(renderAs('manager'))).toEqual([
      'Farms',
      'Exceptions',
      'My work',
      'Work orders',
      'Reports',
    ]);
  });

  it('offers integrators the unknown counters and gateways but not the users', () => {
    expect(navLabels(renderAs('integrator'))).toEqual([
      'Farms',
      'Exceptions',
      'Imports',
      'Unknown counters',
      'Gateways',
    ]);
  });

  it('shows who is signed in', () => {
    expect(renderAs('manager').textContent).toContain('Avery');
  });
});
