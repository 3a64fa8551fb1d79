import { BreakpointObserver } from '@angular/cdk/layout';
import { ChangeDetectionStrategy, Component, computed, inject, viewChild } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatListModule } from '@angular/material/list';
import { MatMenuModule } from '@angular/material/menu';
import { MatSidenav, MatSidenavModule } from '@angular/material/sidenav';
import { MatToolbarModule } from '@angular/material/toolbar';
import { MatTooltipModule } from '@angular/material/tooltip';
import { Router, RouterLink, RouterLinkActive, RouterOutlet } from '@angular/router';
import { map } from 'rxjs';
import { AuthStore } from '../auth/auth-store';
import { NAV_ITEMS } from './nav-items';

/** Toolbar and navigation around every signed-in page; the side navigation is a drawer on phones. */
@Component({
  selector: 'ts-shell',
  imports: [
    RouterOutlet,
    RouterLink,
    RouterLinkActive,
    MatToolbarModule,
    MatSidenavModule,
    MatListModule,
    MatIconModule,
    MatButtonModule,
    MatMenuModule,
    MatTooltipModule,
  ],
  templateUrl: './shell.html',
  styleUrl: './shell.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Shell {
  private readonly auth = inject(AuthStore);
  private readonly router = inject(Router);
  private readonly sidenav = viewChild.required(MatSidenav);

  protected readonly isHandset = toSignal(
    inject(BreakpointObserver)
      .observe('(max-width: 839px)')
      .pipe(map((state) => state.matches)),
    { initialValue: false },
  );
  protected readonly user = this.auth.user;
  protected readonly navItems = computed(() =>
    NAV_ITEMS.filter((item) => this.auth.hasPermission(item.permission)),
  );
  protected readonly roleSummary = computed(() =>
    this.auth
      .memberships()
      .map((m) => `${m.farmName}: ${m.role}`)
      .join(' · '),
  );

  protected closeIfHandset(): void {
    if (this.isHandset()) void this.sidenav().close();
  }

  protected signOut(): void {
    this.auth.signOut();
    void this.router.navigate(['/sign-in']);
  }
}
