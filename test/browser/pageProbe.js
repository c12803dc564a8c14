// Runs inside the page (evaluated as one expression by the browser tests) and
// returns a plain description of what a reader is shown: headings, equations,
// plots, tables, links, stamps, horizontal overflow and the contrast of every
// piece of text against the background it is drawn on. Plain JavaScript on
// purpose: it is sent to the browser as text, untouched by any compiler.
(() => {
  // WCAG 2.1, definition of relative luminance (sRGB).
  const channel = (c) => {
    const s = c / 255;
    return s <= 0.04045 ? s / 12.92 : Math.pow((s + 0.055) / 1.055, 2.4);
  };
  const luminance = ([r, g, b]) => 0.2126 * channel(r) + 0.7152 * channel(g) + 0.0722 * channel(b);
  // WCAG 2.1, definition of contrast ratio.
  const contrast = (a, b) => {
    const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
    return (hi + 0.05) / (lo + 0.05);
  };
  const parseColour = (text) => {
    const m = /rgba?\(([^)]+)\)/.exec(text);
    if (!m) return null;
    const parts = m[1].split(/[\s,/]+/).filter(Boolean).map(Number);
    return { rgb: parts.slice(0, 3), alpha: parts.length > 3 ? parts[3] : 1 };
  };
  const over = (top, alpha, under) => top.map((c, i) => c * alpha + under[i] * (1 - alpha));
  // The colour actually behind an element: its own background or its nearest
  // painted ancestor's, translucent layers blended over what lies beneath.
  const backgroundOf = (el) => {
    const layers = [];
    for (let e = el; e; e = e.parentElement) {
      const c = parseColour(getComputedStyle(e).backgroundColor);
      if (c && c.alpha > 0) {
        layers.push(c);
        if (c.alpha >= 1) break;
      }
    }
    let rgb = [255, 255, 255];
    for (const layer of layers.reverse()) rgb = over(layer.rgb, layer.alpha, rgb);
    return rgb;
  };
  const visible = (el) => {
    const r = el.getBoundingClientRect();
    const s = getComputedStyle(el);
    return r.width > 0 && r.height > 0 && s.visibility !== "hidden" && s.display !== "none";
  };

  const headings = [...document.querySelectorAll("h1, h2, h3, h4, h5, h6")].map((h) => ({
    level: Number(h.tagName[1]),
    text: h.textContent.trim().replace(/\s+/g, " "),
  }));

  const equations = {
    containers: document.querySelectorAll(".equation").length,
    containersWithoutKatex: [...document.querySelectorAll(".equation")].filter((e) => !e.querySelector(".katex")).length,
    katex: document.querySelectorAll(".katex").length,
    errors: [...document.querySelectorAll(".katex-error")].map((e) => e.textContent.slice(0, 80)),
    // KaTeX draws with its own fonts; a missing font file leaves the maths in a fallback face.
    fontsLoaded: document.fonts ? document.fonts.check("16px KaTeX_Main") && document.fonts.check("16px KaTeX_Math") : true,
  };

  const plots = [...document.querySelectorAll("figure.plot-figure")].map((fig) => {
    const svg = fig.querySelector("svg");
    const labelIds = svg ? (svg.getAttribute("aria-labelledby") || "").split(/\s+/).filter(Boolean) : [];
    const label = labelIds.map((id) => (document.getElementById(id) || { textContent: "" }).textContent.trim()).join(" ");
    const marks = svg
      ? [...svg.querySelectorAll(".series")].reduce((n, s) => {
          const shapes = s.matches("path, rect, circle, line, polyline") ? [s] : [...s.querySelectorAll("path, rect, circle, line, polyline")];
          return n + shapes.filter((m) => m.tagName !== "path" || (m.getAttribute("d") || "").length > 2).length;
        }, 0)
      : 0;
    const axisTitles = svg ? [...svg.querySelectorAll(".axis-title")].map((t) => t.textContent.trim()) : [];
    const box = svg ? svg.getBoundingClientRect() : { width: 0, height: 0 };
    return {
      id: fig.id,
      isSvg: !!svg && svg.namespaceURI === "http://www.w3.org/2000/svg",
      role: svg ? svg.getAttribute("role") : null,
      label,
      caption: (fig.querySelector("figcaption") || { textContent: "" }).textContent.trim(),
      marks,
      axisTitles,
      width: box.width,
      height: box.height,
    };
  });
  const loosePlots = [...document.querySelectorAll("svg.plot")].filter((s) => !s.closest("figure.plot-figure")).length;

  const tables = [...document.querySelectorAll("table")].map((t) => ({
    caption: (t.querySelector("caption") || { textContent: "" }).textContent.trim(),
    headerCells: t.querySelectorAll("th").length,
    columnHeadersWithoutScope: [...t.querySelectorAll("thead th")].filter((th) => !th.getAttribute("scope")).length,
    bodyRows: t.querySelectorAll("tbody tr").length,
  }));

  const links = [...document.querySelectorAll("a[href]")].map((a) => ({
    href: a.href,
    raw: a.getAttribute("href"),
    download: a.hasAttribute("download"),
    text: (a.textContent || a.getAttribute("aria-label") || "").trim(),
  }));
  const missingFragments = links
    .filter((l) => l.raw.startsWith("#") && l.raw.length > 1)
    .map((l) => decodeURIComponent(l.raw.slice(1)))
    .filter((id) => !document.getElementById(id));

  const stamps = [...document.querySelectorAll(".stamp")].map((s) => ({
    classes: s.className,
    text: s.textContent.trim().replace(/\s+/g, " "),
    symbol: (s.querySelector(".stamp-symbol") || { textContent: "" }).textContent.trim(),
    borderStyle: getComputedStyle(s).borderTopStyle,
  }));

  const lowContrast = [];
  const walker = document.createTreeWalker(document.body, NodeFilter.SHOW_TEXT);
  const seen = new Set();
  for (let node = walker.nextNode(); node; node = walker.nextNode()) {
    const el = node.parentElement;
    if (!el || seen.has(el) || !node.textContent.trim()) continue;
    seen.add(el);
    // SVG text and MathML (read by assistive technology, hidden on screen) are checked elsewhere.
    if (el.closest("svg, math, .katex-mathml") || !visible(el)) continue;
    const style = getComputedStyle(el);
    const fg = parseColour(style.color);
    if (!fg) continue;
    const bg = backgroundOf(el);
    const ratio = contrast(over(fg.rgb, fg.alpha, bg), bg);
    const size = parseFloat(style.fontSize);
    const bold = Number(style.fontWeight) >= 700;
    // WCAG 2.1 §1.4.3: 4.5:1, or 3:1 for large text (at least 18 pt, or 14 pt bold).
    const needed = size >= 24 || (bold && size >= 18.66) ? 3 : 4.5;
    if (ratio < needed) lowContrast.push({ text: node.textContent.trim().slice(0, 40), color: style.color, ratio: Math.round(ratio * 100) / 100, needed });
  }

  return {
    url: location.href,
    title: document.title,
    lang: document.documentElement.lang,
    headings,
    equations,
    plots,
    loosePlots,
    tables,
    links,
    missingFragments,
    stamps,
    lowContrast,
    scrollWidth: document.scrollingElement.scrollWidth,
    viewportWidth: window.innerWidth,
  };
})();
