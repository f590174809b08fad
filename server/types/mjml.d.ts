// mjml ships without type declarations; this covers the one call the mail templates make.
declare module 'mjml' {
  interface MjmlError {
    line: number;
    message: string;
    tagName: string;
    formattedMessage: string;
  }
  interface MjmlResult {
    html: string;
    errors: MjmlError[];
  }
  export default function mjml2html(mjml: string, options?: { validationLevel?: 'strict' | 'soft' | 'skip'; minify?: boolean }): Promise<MjmlResult>;
}
