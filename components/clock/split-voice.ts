/**
 * Reading splits aloud without a pile-up. Two skaters can cross 0.3 s apart and a sentence takes
 * about two seconds to say, so the voice holds at most ONE sentence besides the one being spoken:
 * - nothing is being spoken: the new sentence is spoken at once;
 * - the lane being spoken crossed again: that sentence is out of date, so it is cut off and the
 *   new one spoken;
 * - another lane is being spoken: the new sentence waits, replacing any sentence already waiting
 *   (the older one is skipped), and is dropped if it has waited too long to mean anything.
 * The speech functions are passed in (store/speech.ts in the app, a mock in the tests).
 */
import type { SpeakOptions } from '../../store/speech';

export interface SpeechLike {
  speak: (text: string, options?: SpeakOptions) => void;
  stop: () => void;
}

/** A waiting sentence older than this is dropped: the skater is half a straight further on. */
export const STALE_SENTENCE_MS = 4000;

export interface SplitVoice {
  /** Says a lane's sentence (or queues it, see above). */
  say: (lane: string, sentence: string) => void;
  /** Silences the voice and forgets anything waiting. */
  hush: () => void;
  /** For the tests and the screen: what is spoken and what waits. */
  state: () => { speaking: string | null; waiting: string | null };
}

export function createSplitVoice(speech: SpeechLike): SplitVoice {
  let current: { lane: string; sentence: string; token: number } | null = null;
  let waiting: { lane: string; sentence: string; at: number } | null = null;
  let tokens = 0;

  const start = (lane: string, sentence: string) => {
    const token = ++tokens;
    current = { lane, sentence, token };
    speech.speak(sentence, {
      onEnd: () => {
        // A sentence cut off on purpose ends after its successor started: ignore it.
        if (current?.token !== token) return;
        current = null;
        const next = waiting;
        waiting = null;
        if (next && Date.now() - next.at <= STALE_SENTENCE_MS) start(next.lane, next.sentence);
      },
    });
  };

  return {
    say(lane, sentence) {
      if (!current) {
        waiting = null;
        start(lane, sentence);
      } else if (current.lane === lane) {
        if (waiting?.lane === lane) waiting = null;
        current = null;
        speech.stop();
        start(lane, sentence);
      } else {
        waiting = { lane, sentence, at: Date.now() };
      }
    },
    hush() {
      waiting = null;
      if (current) {
        current = null;
        speech.stop();
      }
    },
    state: () => ({ speaking: current?.sentence ?? null, waiting: waiting?.sentence ?? null }),
  };
}
