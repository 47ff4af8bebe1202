export { RandomStream } from './stream.ts';
export { makeStream, streamIndex, baseState, BlockStreams, SEED_BLOCK, type StreamPurpose } from './streams.ts';
