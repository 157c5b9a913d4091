/**
 * Bounds on open live streams, so that one account cannot hold the server's file descriptors:
 * a few per session and a few dozen per person, where a new stream closes that session's or
 * person's oldest (a reader reopening a tab keeps working), and a ceiling for the whole process,
 * past which a new stream is refused with 429.
 */
export type StreamCaps = { perSession: number; perPerson: number; total: number };

/** Why a stream was closed to make room, sent to it as its last event. */
export type Displaced = { reason: 'session_stream_limit' | 'person_stream_limit'; message: string };

type OpenStream = { sessionToken: string; userId: string; displace: (why: Displaced) => void };

export function streamRegistry(caps: StreamCaps) {
  // Oldest first; streams are few enough per process for a list.
  const open: OpenStream[] = [];
  const remove = (s: OpenStream) => {
    const i = open.indexOf(s);
    if (i >= 0) open.splice(i, 1);
  };
  const makeRoom = (mine: (s: OpenStream) => boolean, cap: number, why: Displaced) => {
    const held = open.filter(mine);
    for (const s of held.slice(0, Math.max(0, held.length - cap + 1))) {
      remove(s);
      s.displace(why);
    }
  };

  return {
    get size() {
      return open.length;
    },
    /**
     * Takes a new stream in, closing older ones of its session or person past their caps; null
     * when the process holds as many as it may. The answer's `release` is called when it closes.
     */
    admit(stream: OpenStream): { release: () => void } | null {
      if (open.length >= caps.total) return null;
      makeRoom((s) => s.sessionToken === stream.sessionToken, caps.perSession, {
        reason: 'session_stream_limit',
        message: `This session has ${caps.perSession} live streams open at most; the oldest was closed for a newer one.`,
      });
      makeRoom((s) => s.userId === stream.userId, caps.perPerson, {
        reason: 'person_stream_limit',
        message: `One person has ${caps.perPerson} live streams open at most; the oldest was closed for a newer one.`,
      });
      open.push(stream);
      return { release: () => remove(stream) };
    },
  };
}
