package web

import (
	"net/http"
	"strconv"

	"github.com/labstack/echo/v4"

	"aloft/web/views"
)

// handleIssueToken issues an API token for user :id and shows its secret once.
func (s *Server) handleIssueToken(c echo.Context) error {
	id, err := userIDParam(c)
	if err != nil {
		return err
	}
	secret, tok, err := s.store.IssueAPIToken(c.Request().Context(), currentUser(c), id, c.FormValue("label"))
	if ve := asValidation(err); ve != nil {
		return s.usersPage(c, http.StatusUnprocessableEntity, views.UserForm{Errors: ve, TokenFor: id})
	}
	if err != nil {
		return err
	}
	return s.usersPage(c, http.StatusOK, views.UserForm{Notice: "token issued for " + tok.Username, NewToken: secret})
}

func (s *Server) handleRevokeToken(c echo.Context) error {
	id, err := strconv.ParseInt(c.Param("id"), 10, 64)
	if err != nil {
		return echo.NewHTTPError(http.StatusNotFound, "There is no such token.")
	}
	if err := s.store.RevokeAPIToken(c.Request().Context(), currentUser(c), id); err != nil {
		return err
	}
	return c.Redirect(http.StatusSeeOther, "/users?done=token+revoked")
}
