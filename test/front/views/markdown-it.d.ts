/** The part of markdown-it (a CommonMark renderer, installed with @vscode/vsce) the report tests use. */
declare module 'markdown-it' {
  export default class MarkdownIt {
    constructor(options?: { html?: boolean; linkify?: boolean });
    render(markdown: string): string;
  }
}
