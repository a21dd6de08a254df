import 'katex/dist/katex.min.css';
import ReactMarkdown from 'react-markdown';
import rehypeKatex from 'rehype-katex';
import remarkMath from 'remark-math';

/**
 * Markdown with math ($…$ inline, $$…$$ display). Raw HTML is dropped, KaTeX runs
 * with `trust` off (no \href, \url or \htmlClass), and a formula that does not parse
 * shows in red in place instead of breaking the page. KaTeX's fonts are bundled by Vite.
 */
const rehypePlugins: Parameters<typeof ReactMarkdown>[0]['rehypePlugins'] = [[rehypeKatex, { trust: false, throwOnError: false, strict: 'ignore', maxSize: 20, maxExpand: 200 }]];
const remarkPlugins = [remarkMath];

export function Markdown({ children, className = '' }: { children: string; className?: string }) {
  return (
    <div className={`statement text-sm leading-relaxed text-ink ${className}`}>
      <ReactMarkdown remarkPlugins={remarkPlugins} rehypePlugins={rehypePlugins} skipHtml>
        {children}
      </ReactMarkdown>
    </div>
  );
}
