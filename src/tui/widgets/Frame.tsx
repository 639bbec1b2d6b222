import { Box, Text } from 'ink';
import { WORKSPACES, WORKSPACE_NAMES, type Workspace } from '../app-state.js';
import type { KeyHelp } from '../keys.js';
import { colorFor, type Theme } from '../theme.js';

/** Top line: the name, the three workspaces with their keys (the open one in brackets), help and quit. */
export function Header({ workspace, width, theme, activity }: { workspace: Workspace; width: number; theme: Theme; activity?: string | null }) {
  const tabs = WORKSPACES.map((w, i) => ({ w, label: w === workspace ? `[${i + 1} ${WORKSPACE_NAMES[w]}]` : ` ${i + 1} ${WORKSPACE_NAMES[w]} ` }));
  const right = `${activity ? `${activity}  ` : ''}? help  q quit`;
  const used = 9 + tabs.reduce((n, t) => n + t.label.length + 1, 0);
  return (
    <Box width={width}>
      <Text bold color={colorFor(theme, 'accent')}> keyform </Text>
      {tabs.map(({ w, label }) => (
        <Text key={w} bold={w === workspace} inverse={w === workspace && theme.color}>
          {label}{' '}
        </Text>
      ))}
      <Text>{' '.repeat(Math.max(1, width - used - right.length - 1))}</Text>
      <Text color={colorFor(theme, 'dim')}>{right}</Text>
    </Box>
  );
}

/** Bottom line: the keys of the open workspace. */
export function Footer({ hint, width, theme }: { hint: string; width: number; theme: Theme }) {
  return (
    <Box width={width}>
      <Text color={colorFor(theme, 'dim')} wrap="truncate">
        {` ${hint}${width >= hint.length + 22 ? ' · ? help · q quit' : width >= hint.length + 11 ? ' · ? help' : ''}`}
      </Text>
    </Box>
  );
}

/** Full-screen list of every key, grouped by where it works. */
export function HelpOverlay({ groups, width, theme }: { groups: { title: string; keys: readonly KeyHelp[] }[]; width: number; theme: Theme }) {
  const keyWidth = Math.max(...groups.flatMap((g) => g.keys.map((k) => k.keys.length))) + 2;
  return (
    <Box flexDirection="column" width={width}>
      <Text bold color={colorFor(theme, 'accent')}> keyform — every key (any key closes this help, q leaves)</Text>
      {groups.map((g) => (
        <Box key={g.title} flexDirection="column">
          <Text bold> {g.title}</Text>
          {g.keys.map((k) => (
            <Text key={k.keys} wrap="truncate">
              {'   '}
              {k.keys.padEnd(keyWidth)}
              {k.does}
            </Text>
          ))}
        </Box>
      ))}
    </Box>
  );
}

/** An indented line with a leading symbol, coloured only when colour is on (the symbol carries the meaning). */
export function StatusLine({ tone, symbol, text, theme }: { tone: 'good' | 'bad' | 'warn' | 'plain'; symbol: string; text: string; theme: Theme }) {
  return (
    <Text color={colorFor(theme, tone)} wrap="truncate">
      {' '}
      {symbol ? `${symbol} ` : ''}
      {text}
    </Text>
  );
}
