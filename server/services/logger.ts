/** One-line JSON logs; JSON.stringify escapes new lines, so a value cannot forge a log line. */
export type Logger = {
  info(message: string, fields?: Record<string, unknown>): void;
  error(message: string, fields?: Record<string, unknown>): void;
};

export function createLogger(level: 'silent' | 'error' | 'info'): Logger {
  const write = (lvl: string, message: string, fields?: Record<string, unknown>) => {
    const line = JSON.stringify({ t: new Date().toISOString(), level: lvl, message, ...serialise(fields) });
    (lvl === 'error' ? process.stderr : process.stdout).write(`${line}\n`);
  };
  return {
    info: (m, f) => {
      if (level === 'info') write('info', m, f);
    },
    error: (m, f) => {
      if (level !== 'silent') write('error', m, f);
    },
  };
}

function serialise(fields?: Record<string, unknown>) {
  if (!fields) return {};
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(fields)) {
    out[k] = v instanceof Error ? { name: v.name, message: v.message, stack: v.stack } : v;
  }
  return out;
}
