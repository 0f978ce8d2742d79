/* Rendering: plots drawn with cairo (SVG, PDF, PNG) and report documents (HTML, Markdown,
 * LaTeX, PDF). The inputs are plain structs that the commands fill; nothing here computes an
 * embezzlement error. Every file is written atomically (temporary file in the same directory,
 * then rename), so a failed or interrupted write leaves the previous file, or none, and no
 * temporary file behind. */
#ifndef EMBZ_RENDER_H
#define EMBZ_RENDER_H

#include <stddef.h>
#include "embz/flint.h"
#include "embz/err.h"
#include "embz/util.h"
#include "embz/analysis.h"
#include "embz/optimal.h"

/* ------------------------------------------------------------------ colours */

typedef struct { double r, g, b; } embz_rgb_t;

/* Number of colours in the series palette. */
#define EMBZ_PLOT_NCOLOURS 12
/* Special colour indices besides 0 .. EMBZ_PLOT_NCOLOURS-1 (which cycle for larger k). */
#define EMBZ_PLOT_GREY (-1)      /* reference lines, envelopes */
#define EMBZ_PLOT_LIGHT (-2)     /* light grey: "no answer" cells */
#define EMBZ_PLOT_DARK (-3)      /* near black: failures */
/* The colour for index k (see above). */
embz_rgb_t embz_plot_colour(long k);

/* ------------------------------------------------------------------ axes and ticks */

typedef struct {
    double pos;         /* axis coordinate (log10 of the value on log axes) */
    int major;          /* 1: labelled */
    char text[40];      /* label text on the base line ("10", "2×10", "0.5"), "" for minor */
    char sup[24];       /* superscript drawn after text ("100", "-3"), or "" */
} embz_plot_tick_t;

#define EMBZ_PLOT_MAX_TICKS 512

/* Ticks for the axis range [lo, hi] (log10 values when logscale) at coarseness level `level`
 * (0 finest; each level roughly doubles the spacing of the labelled ticks). Log axes label
 * decades 10^k (every 1, 2, 5, 10, 20, 50, ... decades as the level grows) with unlabelled
 * minor ticks in between; ranges under about three decades also label 2 and 5 times a power
 * of ten at level 0. Fills at most EMBZ_PLOT_MAX_TICKS entries of ticks; returns the count,
 * or -1 when the level is too coarse to give any labelled tick (callers stop there). */
slong embz_plot_ticks(embz_plot_tick_t *ticks, double lo, double hi, int logscale, int level);

/* ------------------------------------------------------------------ figures */

/* Series style flags. */
#define EMBZ_PLOT_POINTS 1   /* markers at the points */
#define EMBZ_PLOT_LINE 2     /* a polyline through the points (NaN y breaks it) */
#define EMBZ_PLOT_DASHED 4   /* dashed line */
#define EMBZ_PLOT_BAND 8     /* lo/hi drawn as a shaded band (else as error bars) */
#define EMBZ_PLOT_INTERVALS 16 /* lo/hi drawn as a vertical interval with caps at every point,
                                however short; y may be NaN (bounds, no value), and the
                                intervals count for the axis range */

typedef struct {
    char *label;             /* legend text; NULL or "" keeps it out of the legend */
    int style;               /* EMBZ_PLOT_* flags */
    long colour;             /* embz_plot_colour index */
    int marker;              /* 0 circle, 1 square, 2 triangle, 3 diamond, 4 down, 5 cross */
    slong len, alloc;
    double *x, *y;           /* axis coordinates (log10 values on log axes) */
    double *lo, *hi;         /* enclosure of y, or NaN where none (arrays always present) */
} embz_plot_series_struct;

typedef struct {
    char *name;              /* legend text */
    long colour;             /* embz_plot_colour index */
} embz_plot_category_struct;

enum { EMBZ_PANEL_XY = 0, EMBZ_PANEL_MAP = 1 };

typedef struct {
    int kind;                /* EMBZ_PANEL_XY or EMBZ_PANEL_MAP */
    char *title, *xlabel, *ylabel;
    int xlog, ylog;          /* XY: log10 axes */
    int have_xrange, have_yrange;
    double xmin, xmax, ymin, ymax;   /* fixed ranges (else from the data) */
    slong nseries;
    embz_plot_series_struct *series;
    /* MAP: nx columns by ny rows of cells; cells[iy * nx + ix] is a category index or -1. */
    slong nx, ny;
    char **xticks, **yticks; /* nx and ny labels (the parameter values as text) */
    int *cells;
    slong ncat;
    embz_plot_category_struct *cat;
} embz_plot_panel_struct;

typedef struct {
    char *title;             /* drawn above the panels, or NULL */
    slong npanels;
    embz_plot_panel_struct *panels;
    slong columns;           /* panels per row (default 1) */
    double panel_width, panel_height;   /* in points (default 640 x 420) */
    double png_scale;        /* pixels per point for PNG output (default 1.5) */
    double zoom;             /* everything (text, lines, markers) drawn this many times larger
                                than the panel layout in points (default 1; reports use more
                                so that tick labels stay readable at the page width) */
    size_t fail_after;       /* testing: file writes fail after this many bytes (0: never) */
} embz_plot_struct;
typedef embz_plot_struct embz_plot_t[1];

void embz_plot_init(embz_plot_t fig, const char *title);
void embz_plot_clear(embz_plot_t fig);

/* Add an XY panel; returns its index. */
slong embz_plot_add_panel(embz_plot_t fig, const char *title, const char *xlabel,
                          const char *ylabel, int xlog, int ylog);
void embz_plot_set_xrange(embz_plot_t fig, slong panel, double lo, double hi);
void embz_plot_set_yrange(embz_plot_t fig, slong panel, double lo, double hi);
/* Add a series to a panel; colour < -100 picks the next palette colour. Returns its index. */
slong embz_plot_add_series(embz_plot_t fig, slong panel, const char *label, int style,
                           long colour);
/* Append a point; lo/hi NaN when there is no enclosure. lo may be -inf (clipped at the axis). */
void embz_plot_push(embz_plot_t fig, slong panel, slong series, double x, double y,
                    double lo, double hi);

/* Add a map panel of nx by ny cells, all empty (-1). Labels are copied. Returns its index. */
slong embz_plot_add_map(embz_plot_t fig, const char *title, const char *xlabel,
                        const char *ylabel, slong nx, const char *const *xticks,
                        slong ny, const char *const *yticks);
/* Add a category (legend entry) to a map panel; returns its index. */
slong embz_plot_add_category(embz_plot_t fig, slong panel, const char *name, long colour);
void embz_plot_set_cell(embz_plot_t fig, slong panel, slong ix, slong iy, int category);

/* Write the figure; the format comes from the extension of path (.svg, .pdf, .png, any case).
 * EMBZ_ERR_INPUT for an unknown extension, EMBZ_ERR_IO when the file cannot be written. */
int embz_plot_write(const embz_plot_t fig, const char *path, embz_err_t *err);
/* The same in the named format ("svg", "pdf" or "png", any case; NULL: from the extension),
 * for names that have none, such as "-" (standard output). EMBZ_ERR_INPUT for another name. */
int embz_plot_write_format(const embz_plot_t fig, const char *path, const char *format,
                           embz_err_t *err);
/* The points of every XY panel as CSV (malloc'ed): panel title, series label, x, y and the
 * bar y_lo, y_hi (empty where the series has none), as values (10^c on log axes). They are
 * the doubles drawn: the midpoints and ends of certified enclosures, not certified digits. */
char *embz_plot_data_csv(const embz_plot_t fig);
/* The figure as SVG text for inlining in HTML: no XML declaration, ids prefixed with
 * id_prefix (so several figures can share one document), width 100% with the aspect ratio
 * kept. *svg is malloc'ed. */
int embz_plot_svg_string(char **svg, const embz_plot_t fig, const char *id_prefix,
                         embz_err_t *err);
/* Total size of the figure in points (zoom included). */
void embz_plot_size(double *width, double *height, const embz_plot_t fig);

/* Free the font caches cairo and fontconfig keep for the whole process. Call only when
 * nothing is drawing any more (end of a test, end of a command): leak checkers then see only
 * real leaks. Drawing afterwards still works (the caches are rebuilt). */
void embz_render_release_caches(void);

/* Files are written through embz_afile_t (embz/util.h). */

/* ------------------------------------------------------------------ reports */

/* One family's row. All strings are malloc'ed (NULL: not available, shown as "–"). Numbers are
 * given as text exactly as they should appear: certified digits, or estimates that say so. */
typedef struct {
    char *name;
    char *weight;            /* the weight expression */
    char *verdict;           /* e.g. "embezzler" */
    char *law;               /* fitted law, e.g. "C (ln n)^-g" */
    char *exponent;          /* e.g. "g ≈ 1.00 (estimate)" */
    char *limit_lo, *limit_hi;
    char **error_at;         /* report->nsizes entries */
    char **need_n;           /* report->ngoals entries */
    char **need_qubits;      /* report->ngoals entries */
    char **extra_qubits;     /* report->ngoals entries: qubits per side beyond the optimum's
                                (a column per goal only when report->extra_columns) */
    char *summary;           /* the reason in one line, for the key table (or NULL) */
    char *notes;             /* free text (paragraphs separated by blank lines; a paragraph
                                starting with a bullet and a space is a list item) */
} embz_report_family_struct;

typedef struct {
    char *caption;
    const embz_plot_struct *plot;   /* borrowed; drawn natively (HTML: inline SVG; PDF) */
    char *svg;               /* or SVG text to inline (HTML only) */
    char *path;              /* or a file: .svg inlined / .png embedded in HTML, linked in
                                Markdown and LaTeX, drawn in PDF when .png */
} embz_report_figure_struct;

typedef struct {
    char *title;
    char *subtitle;          /* e.g. "target: 2 ebits; goal 1e-3" */
    char *answer;            /* the answer in one sentence, shown first (or NULL) */
    char *intro;             /* free text, after the key table */
    slong nsizes;
    char **sizes;            /* column heads of the error columns, e.g. "10^6" */
    slong ngoals;
    char **goals;            /* error goals, e.g. "1e-3" */
    slong nfam;
    embz_report_family_struct *fam;
    slong nfig;
    embz_report_figure_struct *fig;
    char *footer;            /* e.g. how the numbers were computed */
    int extra_columns;       /* 1: each goal gets a third column, "extra qubits for E <= e"
                                (the family's qubits per side minus the optimum's) */
    size_t fail_after;       /* testing: file writes fail after this many bytes (0: never) */
} embz_report_struct;
typedef embz_report_struct embz_report_t[1];

void embz_report_init(embz_report_t r, const char *title);
void embz_report_clear(embz_report_t r);
/* Replace a string field by a copy of text (NULL allowed). */
void embz_report_set(char **field, const char *text);
/* Column heads; must be called before families are added. */
void embz_report_set_sizes(embz_report_t r, slong n, const char *const *sizes);
void embz_report_set_goals(embz_report_t r, slong n, const char *const *goals);
/* A new family row with every field NULL (arrays sized by the current sizes and goals). */
embz_report_family_struct *embz_report_add_family(embz_report_t r, const char *name);
embz_report_figure_struct *embz_report_add_figure(embz_report_t r, const char *caption,
                                                 const embz_plot_struct *plot);

enum { EMBZ_REPORT_HTML = 0, EMBZ_REPORT_MD, EMBZ_REPORT_TEX, EMBZ_REPORT_PDF };
/* "html"/"htm", "md"/"markdown", "tex"/"latex", "pdf"; -1 when unknown. */
int embz_report_format_from_name(const char *name);

/* Document text; *text malloc'ed. The answer and the key table come first (family, verdict,
 * qubits and extra qubits per goal, E at the largest size, the reason in one line; each name
 * links to the family's notes), then the figures with their captions, the notes of each
 * family, and the full numbers in two tables (classification; errors and sizes). Markdown and
 * LaTeX text made here carry only figures given as files; embz_report_write also writes the
 * drawn figures beside the document and links them. */
int embz_report_html(char **text, const embz_report_t r, embz_err_t *err);
int embz_report_markdown(char **text, const embz_report_t r, embz_err_t *err);
int embz_report_latex(char **text, const embz_report_t r, embz_err_t *err);
/* Write the report to path in the given format (PDF drawn with cairo). For Markdown and LaTeX
 * each drawn figure K is written first, atomically, beside the document as STEM-figK.svg
 * (Markdown) or STEM-figK.pdf (LaTeX), STEM the path without its extension, and linked by
 * that name; on standard output ("-") no figure file is written and the text says so. */
int embz_report_write(const embz_report_t r, const char *path, int format, embz_err_t *err);

/* The file of drawn figure k (0-based) beside the document path in format (Markdown:
 * STEM-fig(k+1).svg, LaTeX: STEM-fig(k+1).pdf, STEM the path without its extension);
 * malloc'ed, NULL for the other formats and for standard output. */
char *embz_report_figure_path(const char *path, slong k, int format);

/* Escaped copies of text (malloc'ed): HTML (& < > " '), LaTeX specials, Markdown specials. */
char *embz_html_escape(const char *text);
char *embz_latex_escape(const char *text);
char *embz_markdown_escape(const char *text);

/* ---- words for the library's facts ---- */
/* The sentence for one reason of a classification (malloc'ed; the caller frees it). Numbers
 * of fits are printed as the estimates they are; certified values come as their texts. */
/* The sentence saying that a sweep was narrowed to the reach of explicit summation and why
 * (embz_sweep_struct.narrowed); NULL when it was not. */
char *embz_sweep_narrow_text(const embz_sweep_struct *s);
char *embz_classify_fact_text(const embz_classify_fact_struct *f);
/* The distance a measure's classification fits (embz_mclassify): "P", "1 - F_max",
 * "1 - O". */
const char *embz_mclassify_distance_name(int measure);
/* How a value was computed (malloc'ed; the caller frees it): the method, its budgets and
 * counts, and the reason behind a fallback or a bracket, in full. */
char *embz_error_how_text(const embz_error_how_struct *h);
char *embz_fidelity_how_text(const embz_fidelity_how_struct *h);
/* How an optimum (embz/optimal.h) was found (malloc'ed). */
char *embz_optimal_how_text(const embz_optimal_result_struct *r);
/* How the best fidelity-type value (embz_optimal_fid) was certified (malloc'ed). */
char *embz_optimal_fid_how_text(const embz_optimal_fid_struct *r);

#endif
