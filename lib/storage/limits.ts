// Upload limits the phone checks before sending and the server enforces (lib/storage/recording-upload.ts).

/** 60 minutes of Opus at 64 kbit/s is about 29 MB; anything much larger is not a bench recording. */
export const MAX_RECORDING_BYTES = 64 * 1024 * 1024;

/**
 * The longest recording "Use a recording" analyses on the phone: decoded, a minute of sound at
 * 48 kHz is 11 MB of samples, so 20 minutes is about what a phone's memory takes comfortably.
 */
export const MAX_TAKE_SECONDS = 20 * 60;
