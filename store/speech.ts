/**
 * A thin wrapper over expo-speech: the screens call speak() and stop() from here, so tests can
 * replace this module and check what would have been said. Speaking is never required: where the
 * platform has no voice, speak() reports 'failed' and the screen says so.
 */
import * as Speech from 'expo-speech';
import { Platform } from 'react-native';

export type SpeechOutcome = 'done' | 'stopped' | 'failed';

export interface SpeakOptions {
  /** Called once when this text has been spoken, was stopped, or could not be spoken. */
  onEnd?: (outcome: SpeechOutcome) => void;
}

/** Whether this platform can speak at all (a browser without speech synthesis cannot). */
export function canSpeak(): boolean {
  return Platform.OS !== 'web' || (typeof window !== 'undefined' && 'speechSynthesis' in window);
}

/** Speaks `text` after anything already queued (the platform queues utterances in order). */
export function speak(text: string, options: SpeakOptions = {}): void {
  let ended = false;
  const end = (outcome: SpeechOutcome) => {
    if (ended) return;
    ended = true;
    options.onEnd?.(outcome);
  };
  if (!canSpeak()) return end('failed');
  try {
    Speech.speak(text, { rate: 0.95, onDone: () => end('done'), onStopped: () => end('stopped'), onError: () => end('failed') });
  } catch {
    end('failed');
  }
}

/** Stops speaking and drops anything still queued. */
export function stop(): void {
  if (!canSpeak()) return;
  void Speech.stop().catch(() => undefined);
}
