/** The UI kit's public surface: import from 'components/ui' rather than from individual files. */
export * from './theme';
export * from './use-breakpoint';
export * from './text';
export * from './button';
export * from './text-field';
export * from './card';
export * from './banner';
export * from './screen';
export * from './choice-chips';
export * from './mark-badge';
export * from './loading';
export * from './use-zod-form';
export * from './text-link';
export * from './placeholder-panel';
export * from './toggle-row';
export * from './offline-badge';
export * from './format';
