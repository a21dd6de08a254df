/** The form controls moved to src/components/inputs.tsx (shared with the submissions feature). */
export * from '../../../components/inputs';
