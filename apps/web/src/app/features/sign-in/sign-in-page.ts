import { ChangeDetectionStrategy, Component, inject, input, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError } from '../../core/http/api-error';

@Component({
  selector: 'ts-sign-in-page',
  imports: [
    ReactiveFormsModule,
    MatFormFieldModule,
    MatInputModule,
    MatButtonModule,
    MatIconModule,
    MatProgressBarModule,
    RouterLink,
  ],
  templateUrl: './sign-in-page.html',
  styleUrl: './sign-in-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SignInPage {
  private readonly auth = inject(AuthStore);
  private readonly router = inject(Router);

  /** Query parameters, bound by the router. */
  readonly reason = input<string>();
  readonly returnTo = input<string>();

  protected readonly form = inject(NonNullableFormBuilder).group({
    email: ['', [Validators.required, Validators.email]],
    password: ['', [Validators.required]],
  });
  protected readonly isBusy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly isPasswordShown = signal(false);

  protected async submit(): Promise<void> {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.isBusy.set(true);
    this.error.set(null);
    try {
      await this.auth.signIn(this.form.getRawValue());
      const target = this.returnTo();
      // Only in-app paths: a crafted link must not send a user to another site after sign-in.
      await this.router.navigateByUrl(
        target?.startsWith('/') && !target.startsWith('//') ? target : '/farms',
      );
    } catch (error) {
      this.error.set(describeApiError(error));
    } finally {
      this.isBusy.set(false);
    }
  }
}
