import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { forgotPasswordSchema } from '@tierscope/contracts';
import { describeApiError } from '../../core/http/api-error';
import { firstError, zodValidator } from '../../shared/ui/zod-validator';
import { AuthStore } from '../../core/auth/auth-store';

/** Asks for a reset link; says the same whether or not the address has an account. */
@Component({
  selector: 'ts-forgot-password-page',
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
      <section class="card" aria-labelledby="forgot-title">
        @if (isBusy()) {
          <mat-progress-bar mode="indeterminate" class="progress" />
        }
        <header>
          <img src="favicon.svg" alt="" width="40" height="40" />
          <div>
            <h1 id="forgot-title">Forgot your password?</h1>
            <p class="ts-muted">We mail you a link to choose a new one.</p>
          </div>
        </header>
        @if (sentMessage(); as message) {
          <p class="notice" role="status"><mat-icon>mark_email_read</mat-icon> {{ message }}</p>
        } @else {
          @if (error(); as message) {
            <p class="error" role="alert"><mat-icon>error</mat-icon> {{ message }}</p>
          }
          <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
            <mat-form-field appearance="outline">
              <mat-label>E-mail</mat-label>
              <input matInput formControlName="email" type="email" autocomplete="username" />
              <mat-error>{{ firstError(form.controls.email) }}</mat-error>
            </mat-form-field>
            <button mat-flat-button type="submit" [disabled]="isBusy()">Mail me a link</button>
          </form>
        }
        <p class="aside"><a routerLink="/sign-in">Back to sign in</a></p>
      </section>
    </main>
  `,
  styleUrl: './sign-in-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ForgotPasswordPage {
  private readonly auth = inject(AuthStore);
  protected readonly form = inject(NonNullableFormBuilder).group({
    email: ['', zodValidator(forgotPasswordSchema.shape.email)],
  });
  protected readonly isBusy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly sentMessage = signal<string | null>(null);
  protected readonly firstError = firstError;

  protected async submit(): Promise<void> {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.isBusy.set(true);
    this.error.set(null);
    try {
      const message = await this.auth.requestPasswordReset(this.form.getRawValue());
      this.sentMessage.set(`${message} Check your inbox; the link works for an hour.`);
    } catch (error) {
      this.error.set(describeApiError(error));
    } finally {
      this.isBusy.set(false);
    }
  }
}
