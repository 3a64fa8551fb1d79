/** Faults the simulator can plant, each a pattern Tierscope should find. */
export type Fault =
  | { kind: 'feed'; house: string; row: number; drop: number; from: Date }
  | { kind: 'water'; house: string; tier: number; declinePerHour: number; from: Date }
  | { kind: 'silent'; house: string; row: number; tier: number; from: Date }
  | { kind: 'collector-drift'; house: string; pct: number; from: Date };

const UNITS: Record<string, number> = { m: 60_000, h: 3_600_000, d: 86_400_000 };

/** "+2h", "-3d", "+30m" relative to `start`, or an ISO time. */
export function parseWhen(text: string | undefined, start: Date): Date {
  if (text === undefined || text === '') return start;
  const relative = /^([+-])(\d+(?:\.\d+)?)([mhd])$/.exec(text);
  if (relative) {
    const [, sign, amount, unit] = relative as unknown as [string, string, string, string];
    const ms = Number(amount) * (UNITS[unit] ?? 0);
    return new Date(start.getTime() + (sign === '-' ? -ms : ms));
  }
  const absolute = new Date(text);
  if (Number.isNaN(absolute.getTime()))
    throw new Error(`"${text}" is not a time: use +2h, -3d or an ISO time`);
  return absolute;
}

/**
 * Parses `kind:key=value,…`, e.g. `feed:house=House 1,row=3,drop=0.15,from=+2h`,
 * `water:house=H,tier=2,decline=0.02/h`, `silent:house=H,row=2,tier=1,from=-1h`,
 * `collector-drift:house=H,pct=4`.
 */
export function parseFault(spec: string, start: Date): Fault {
  const colon = spec.indexOf(':');
  if (colon < 0) throw new Error(`fault "${spec}": expected kind:key=value,…`);
  const kind = spec.slice(0, colon);
  const fields = new Map(
    spec
      .slice(colon + 1)
      .split(',')
      .map((pair) => pair.split('=').map((s) => s.trim()) as [string, string]),
  );
  const need = (key: string): string => {
    const value = fields.get(key);
    if (value === undefined || value === '') throw new Error(`fault "${spec}": ${key}= is missing`);
    return value;
  };
  const number = (key: string): number => {
    const value = Number(need(key).replace(/\/h$/, ''));
    if (!Number.isFinite(value)) throw new Error(`fault "${spec}": ${key} is not a number`);
    return value;
  };
  const house = need('house');
  const from = parseWhen(fields.get('from'), start);
  switch (kind) {
    case 'feed':
      return { kind, house, row: number('row'), drop: number('drop'), from };
    case 'water':
      return { kind, house, tier: number('tier'), declinePerHour: number('decline'), from };
    case 'silent':
      return { kind, house, row: number('row'), tier: number('tier'), from };
    case 'collector-drift':
      return { kind, house, pct: number('pct'), from };
    default:
      throw new Error(
        `fault "${spec}": unknown kind "${kind}" (feed, water, silent, collector-drift)`,
      );
  }
}

export function describeFault(fault: Fault): string {
  switch (fault.kind) {
    case 'feed':
      return `feed-line fault: ${fault.house}, row ${fault.row}, all tiers ${Math.round(fault.drop * 100)} % down`;
    case 'water':
      return `water problem: ${fault.house}, tier ${fault.tier}, falling ${fault.declinePerHour * 100} % an hour`;
    case 'silent':
      return `dead counter: ${fault.house}, row ${fault.row}, tier ${fault.tier} counts nothing`;
    case 'collector-drift':
      return `collector drift: ${fault.house}, collector reads ${fault.pct} % off`;
  }
}
