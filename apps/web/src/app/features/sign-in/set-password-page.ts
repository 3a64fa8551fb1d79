import { ChangeDetectionStrategy, Component, inject, input, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import { setPasswordSchema } from '@tierscope/contracts';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError } from '../../core/http/api-error';
import { firstError, zodValidator } from '../../shared/ui/zod-validator';

/** Where an invitation or reset link lands: choose a password, then straight in. */
@Component({
  selector: 'ts-set-password-page',
  imports: [
    ReactiveFormsModule,
    RouterLink,
    MatFormFieldModule,
    MatInputModule,
    MatButtonModule,
    MatIconModule,
    MatProgressBarModule,
  ],
  template: `
    <main class="page">
      <section class="card" aria-labelledby="set-title">
        @if (isBusy()) {
          <mat-progress-bar mode="indeterminate" class="progress" />
        }
        <header>
          <img src="favicon.svg" alt="" width="40" height="40" />
          <div>
            <h1 id="set-title">Choose your password</h1>
            <p class="ts-muted">At least 10 characters. A short sentence works well.</p>
          </div>
        </header>
        @if (!token()) {
          <p class="error" role="alert">
            <mat-icon>link_off</mat-icon> This link is not complete. Open it from the mail again.
          </p>
        } @else {
          @if (error(); as message) {
            <p class="error" role="alert"><mat-icon>error</mat-icon> {{ message }}</p>
          }
          <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
            <mat-form-field appearance="outline">
              <mat-label>New password</mat-label>
              <input
                matInput
                formControlName="password"
                type="password"
                autocomplete="new-password"
              />
              <mat-error>{{ firstError(form.controls.password) }}</mat-error>
            </mat-form-field>
            <mat-form-field appearance="outline">
              <mat-label>The same again</mat-label>
              <input
                matInput
                formControlName="repeat"
                type="password"
                autocomplete="new-password"
              />
              <mat-error>{{ firstError(form.controls.repeat) }}</mat-error>
            </mat-form-field>
            <button mat-flat-button type="submit" [disabled]="isBusy()">Save and sign in</button>
          </form>
        }
        <p class="aside"><a routerLink="/forgot-password">Ask for a new link</a></p>
      </section>
    </main>
  `,
  styleUrl: './sign-in-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SetPasswordPage {
  private readonly auth = inject(AuthStore);
  private readonly router = inject(Router);

  /** The link's token, bound from the query string by the router. */
  readonly token = input<string>();

  protected readonly form = inject(NonNullableFormBuilder).group({
    password: ['', zodValidator(setPasswordSchema.shape.password)],
    repeat: [''],
  });
  protected readonly isBusy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly firstError = firstError;

  protected async submit(): Promise<void> {
    const { password, repeat } = this.form.getRawValue();
    if (password !== repeat)
      this.form.controls.repeat.setErrors({ server: 'The two do not match' });
    const token = this.token();
    if (this.form.invalid || !token) {
      this.form.markAllAsTouched();
      return;
    }
    this.isBusy.set(true);
    this.error.set(null);
    try {
      await this.auth.setPassword({ token, password });
      await this.router.navigateByUrl('/farms');
    } catch (error) {
      this.error.set(describeApiError(error));
    } finally {
      this.isBusy.set(false);
    }
  }
}
