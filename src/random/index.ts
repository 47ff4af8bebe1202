export { RandomStream } from './stream.ts';
export { makeStream, streamIndex, baseState, type StreamPurpose } from './streams.ts';
