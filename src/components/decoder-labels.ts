import type { DecoderSource } from '@shared/api/decoders';

export const DECODER_SOURCE_LABEL: Record<DecoderSource, string> = {
  import: 'Imported artifact',
  'training-job': 'Training job',
  demo: 'Demo decoder',
};
