// Types for the two npm WAV decoders used only as references in tests.
declare module "wav-decoder" {
  interface Decoded {
    sampleRate: number;
    channelData: Float32Array[];
  }
  const wavDecoder: { decode: { sync(buffer: Buffer, opts?: { symmetric?: boolean }): Decoded } };
  export default wavDecoder;
}
declare module "node-wav" {
  const nodeWav: { decode(buffer: Buffer): { sampleRate: number; channelData: Float32Array[] } };
  export default nodeWav;
}
