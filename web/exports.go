package web

import (
	"bytes"
	"context"
	"net/http"
	"strconv"
	"strings"

	"github.com/labstack/echo/v4"

	"aloft/records"
	"aloft/reports"
	"aloft/web/views"
)

// exportRoles may see and download the permit-reporting exports: the
// licensed rehabilitator (the permit holder) and admins.
var exportRoles = []records.Role{records.RoleRehabilitator, records.RoleAdmin}

// exportPageRows is how many listing rows the page shows; downloads have all.
const exportPageRows = 500

// exportRoutes adds the exports page and its downloads, for exportRoles only.
func (s *Server) exportRoutes(g *echo.Group) {
	ex := g.Group("/exports", requireRole(exportRoles...))
	ex.GET("", s.handleExports)
	ex.GET("/cases.csv", s.handleExportCases)
	ex.GET("/summary.csv", s.handleExportSummary)
	ex.GET("/patients/:case/record.csv", s.handleExportPatientCSV)
	ex.GET("/patients/:case/casefile.json", s.handleExportCaseFile)
}

// exportYear reads ?year=, defaulting to the current year.
func (s *Server) exportYear(c echo.Context) (int, string, bool) {
	raw := strings.TrimSpace(c.QueryParam("year"))
	if raw == "" {
		y := s.now().Year()
		return y, strconv.Itoa(y), true
	}
	y, err := strconv.Atoi(raw)
	return y, raw, err == nil && y >= 1900 && y <= 9999
}

// yearExports builds and reconciles the year's listing and summary. A
// failed reconciliation is logged with an incident id, returned in the
// sentence problem.
func (s *Server) yearExports(ctx context.Context, year int, opts reports.ExportOptions) (listing []reports.CaseRow, sum reports.Summary, problem string, err error) {
	if listing, err = reports.CaseListing(ctx, s.store, year, opts); err != nil {
		return nil, sum, "", err
	}
	if sum, err = reports.SpeciesSummary(ctx, s.store, year); err != nil {
		return nil, sum, "", err
	}
	if rerr := reports.Reconcile(listing, sum); rerr != nil {
		id := incidentID()
		s.log.Error("exports do not reconcile", "incident", id, "year", year, "err", rerr)
		problem = "The case listing and the summary of " + strconv.Itoa(year) +
			" do not agree, so neither can be exported. Quote incident " + id + " to your administrator."
	}
	return listing, sum, problem, nil
}

func (s *Server) handleExports(c echo.Context) error {
	ctx := c.Request().Context()
	year, raw, ok := s.exportYear(c)
	pg := views.ExportsPage{Year: year, YearField: raw}
	var err error
	if pg.Years, err = s.store.CaseYears(ctx); err != nil {
		return err
	}
	if !ok {
		pg.Problem = "Enter the year as four digits, such as " + strconv.Itoa(s.now().Year()) + "."
		return render(c, http.StatusUnprocessableEntity, views.ExportsView(s.meta(c, "Permit reporting"), pg))
	}
	pg.Listing, pg.Summary, pg.Problem, err = s.yearExports(ctx, year, reports.ExportOptions{})
	if err != nil {
		return err
	}
	pg.Reconciled = pg.Problem == ""
	pg.Shown = min(len(pg.Listing), exportPageRows)
	return render(c, http.StatusOK, views.ExportsView(s.meta(c, "Permit reporting"), pg))
}

func exportOptions(c echo.Context) (reports.ExportOptions, reports.CSVOptions) {
	return reports.ExportOptions{IncludeFinders: c.QueryParam("finders") == "1"},
		reports.CSVOptions{BOM: c.QueryParam("bom") == "1"}
}

// sendDownload answers with body as an attachment named filename. Exports
// may hold personal data: no caching. Callers log the export first
// (records.Store.LogExport), so the audit trail says who took what.
func sendDownload(c echo.Context, contentType, filename string, body []byte) error {
	h := c.Response().Header()
	h.Set("Content-Disposition", `attachment; filename="`+filename+`"`)
	h.Set("Cache-Control", "no-store")
	return c.Blob(http.StatusOK, contentType, body)
}

const csvType = "text/csv; charset=utf-8"

func (s *Server) yearDownload(c echo.Context, kind string) error {
	year, _, ok := s.exportYear(c)
	if !ok {
		return echo.NewHTTPError(http.StatusBadRequest, "Give the year as four digits.")
	}
	opts, csvOpts := exportOptions(c)
	listing, sum, problem, err := s.yearExports(c.Request().Context(), year, opts)
	if err != nil {
		return err
	}
	if problem != "" {
		return echo.NewHTTPError(http.StatusConflict, problem)
	}
	var buf bytes.Buffer
	if kind == "cases" {
		err = reports.WriteCaseListingCSV(&buf, listing, opts.IncludeFinders, csvOpts)
	} else {
		err = reports.WriteSummaryCSV(&buf, sum, csvOpts)
	}
	if err != nil {
		return err
	}
	if err := s.store.LogExport(c.Request().Context(), currentUser(c).ID, 0,
		records.ExportRecord{Kind: kind, Year: year, IncludeFinders: opts.IncludeFinders}); err != nil {
		return err
	}
	return sendDownload(c, csvType, "aloft-"+kind+"-"+strconv.Itoa(year)+".csv", buf.Bytes())
}

func (s *Server) handleExportCases(c echo.Context) error   { return s.yearDownload(c, "cases") }
func (s *Server) handleExportSummary(c echo.Context) error { return s.yearDownload(c, "summary") }

// safeFileName keeps a case number's letters, digits and dashes.
func safeFileName(s string) string {
	return strings.Map(func(r rune) rune {
		if r >= '0' && r <= '9' || r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r == '-' {
			return r
		}
		return '_'
	}, s)
}

func (s *Server) handleExportPatientCSV(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	opts, csvOpts := exportOptions(c)
	_, rows, err := reports.PatientHistory(c.Request().Context(), s.store, p.CaseNumber, opts)
	if err != nil {
		return err
	}
	var buf bytes.Buffer
	if err := reports.WritePatientCSV(&buf, p.CaseNumber, rows, csvOpts); err != nil {
		return err
	}
	if err := s.store.LogExport(c.Request().Context(), currentUser(c).ID, p.ID,
		records.ExportRecord{Kind: "patient-csv", CaseNumber: p.CaseNumber, IncludeFinders: opts.IncludeFinders}); err != nil {
		return err
	}
	return sendDownload(c, csvType, "aloft-"+safeFileName(p.CaseNumber)+".csv", buf.Bytes())
}

func (s *Server) handleExportCaseFile(c echo.Context) error {
	p, err := s.patientFromPath(c)
	if err != nil {
		return err
	}
	opts, _ := exportOptions(c)
	var buf bytes.Buffer
	err = reports.WritePatientCaseFile(c.Request().Context(), &buf, s.store, p.CaseNumber, opts)
	if ve := asValidation(err); ve != nil {
		return echo.NewHTTPError(http.StatusUnprocessableEntity, "This patient's records cannot be written as a case file: "+ve.Error())
	}
	if err != nil {
		return err
	}
	if err := s.store.LogExport(c.Request().Context(), currentUser(c).ID, p.ID,
		records.ExportRecord{Kind: "patient-casefile", CaseNumber: p.CaseNumber, IncludeFinders: opts.IncludeFinders}); err != nil {
		return err
	}
	return sendDownload(c, "application/json; charset=utf-8", "aloft-"+safeFileName(p.CaseNumber)+".json", buf.Bytes())
}
