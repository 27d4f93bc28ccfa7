import type { LinkStatus } from '../../contracts/control-link';
import { fmt } from '../../format';
import { Text } from '../ui/text';

const STATE: Record<LinkStatus['state'], string> = {
  connected: 'connected',
  connecting: 'connecting',
  disconnected: 'disconnected, retrying',
  refused: 'refused',
  idle: 'no running batch',
  disabled: 'switched off',
  off: 'not running on this server',
};

/** The age of a value in words: seconds, minutes or hours. */
export function ageText(s: number | null): string {
  if (s === null) return 'no value yet';
  if (s < 90) return `${Math.round(s)} s ago`;
  if (s < 5400) return `${Math.round(s / 60)} min ago`;
  return `${fmt(s / 3600)} h ago`;
}

/** One line on the batch page: is the vessel's temperature coming from the control system, and how fresh. */
export function LinkLine({ link }: { link: LinkStatus }) {
  const up = link.state === 'connected' && !link.lastError;
  const value = link.lastValueC === null ? '' : ` · last ${fmt(link.lastValueC)} °C ${ageText(link.ageS)}`;
  return (
    <Text variant="small" tone={up ? 'success' : 'warning'} weight="semibold" testID="batch-link">
      Control system (read-only): {STATE[link.state]}
      {value}
      {link.lastError ? ` · ${link.lastError}. Log readings by hand until it is back.` : ''}
    </Text>
  );
}
