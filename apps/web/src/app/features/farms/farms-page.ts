import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { LoadState } from '../../shared/ui/load-state';
import { FarmHouses } from './farm-houses';
import { FarmsStore } from './farms-store';

/** Every farm the user belongs to, each with its houses. */
@Component({
  selector: 'ts-farms-page',
  imports: [FarmHouses, LoadState, MatIconModule],
  templateUrl: './farms-page.html',
  styleUrl: './farms-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FarmsPage {
  protected readonly store = inject(FarmsStore);
}
