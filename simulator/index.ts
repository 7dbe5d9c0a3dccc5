/**
 * The simulator's public surface: profiles, the generator, the embedded feed, offline
 * recordings, feed sources (generator, EDF replay) and the bridge client.
 */
export { parseProfile, ProfileError, DEFAULT_BACKGROUND, DEFAULT_RHYTHMS, type SimulationProfile, type SimulationProfileInput } from './profile';
export { createSimulation, generateChunk, simulationTruth, type SimulationState, type GeneratedChunk } from './generator';
export type { GroundTruth, TruthSource, TruthEffect, TruthCue, TruthArtifact, TruthDropout } from './truth';
export { createSimulatedFeed, type SimulatedFeed, type SimulatedFeedOptions } from './embedded';
export { simulateRecording, type SimulateOptions } from './offline';
export { simulatedSource } from './simulated-source';
export { replaySource, replayCues, feedChannelNames, type ReplayOptions } from './replay';
export { blockItems, itemFrame, interleave, type FeedItem, type FeedSource } from './feed-items';
export { FeedBridgeClient, BridgeRefusedError, feedUrl, type BridgeClientOptions, type BridgeEvent, type BridgeStats } from './bridge-client';
export { runBridge, type RunBridgeOptions } from './bridge-run';
