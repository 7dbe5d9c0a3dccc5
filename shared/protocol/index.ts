/**
 * Aftercue feed protocol (version 1): frame types, limits, encoders, decoder and the receiving
 * state machine. Byte layouts and examples: docs/feed-protocol.md.
 */
export * from './frames';
export { encodeAck, encodeChunk, encodeCue, encodeFrame, encodeGap, encodeHello, encodeKeepalive, encodeRefuse } from './encode';
export { decodeFrame } from './decode';
export { FeedAcceptor, type AcceptorEvent, type AcceptorSnapshot } from './acceptor';
