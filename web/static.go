package web

import (
	"embed"
	"mime"
	"net/http"
	"path"
	"strings"

	"github.com/labstack/echo/v4"

	"aloft/web/views"
)

//go:embed static
var staticFS embed.FS

func (s *Server) handleStatic(c echo.Context) error {
	name := path.Clean("static/" + strings.TrimPrefix(c.Param("*"), "/"))
	if !strings.HasPrefix(name, "static/") {
		return echo.NewHTTPError(http.StatusNotFound, "No such file.")
	}
	b, err := staticFS.ReadFile(name)
	if err != nil {
		return echo.NewHTTPError(http.StatusNotFound, "No such file.")
	}
	ct := mime.TypeByExtension(path.Ext(name))
	if ct == "" {
		ct = "application/octet-stream"
	}
	c.Response().Header().Set("Cache-Control", "no-cache")
	return c.Blob(http.StatusOK, ct, b)
}

func (s *Server) handleCautions(c echo.Context) error {
	return render(c, http.StatusOK, views.CautionsPage(s.meta(c, "Cautions"), views.ParseCautions(s.cfg.Cautions)))
}
