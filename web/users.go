package web

import (
	"net/http"
	"strconv"
	"strings"

	"github.com/labstack/echo/v4"

	"aloft/records"
	"aloft/web/views"
)

func (s *Server) usersPage(c echo.Context, status int, f views.UserForm) error {
	users, err := s.store.Users(c.Request().Context())
	if err != nil {
		return err
	}
	tokens, err := s.store.APITokens(c.Request().Context())
	if err != nil {
		return err
	}
	return render(c, status, views.UsersPage(s.meta(c, "People"), users, tokens, f))
}

func (s *Server) handleUsers(c echo.Context) error {
	return s.usersPage(c, http.StatusOK, views.UserForm{Notice: c.QueryParam("done")})
}

func formRoles(c echo.Context) []records.Role {
	form, _ := c.FormParams()
	var rs []records.Role
	for _, r := range form["roles"] {
		rs = append(rs, records.Role(r))
	}
	return rs
}

func (s *Server) handleAddUser(c echo.Context) error {
	f := views.UserForm{Username: strings.TrimSpace(c.FormValue("username")), DisplayName: c.FormValue("display_name"), Roles: formRoles(c)}
	_, err := s.store.AddUser(c.Request().Context(), currentUser(c).ID, records.NewUser{Username: f.Username,
		DisplayName: f.DisplayName, Password: c.FormValue("password"), Roles: f.Roles})
	if ve := asValidation(err); ve != nil {
		f.Errors = ve
		return s.usersPage(c, http.StatusUnprocessableEntity, f)
	}
	if err != nil {
		return err
	}
	return c.Redirect(http.StatusSeeOther, "/users?done=added+"+f.Username)
}

func userIDParam(c echo.Context) (int64, error) {
	id, err := strconv.ParseInt(c.Param("id"), 10, 64)
	if err != nil {
		return 0, echo.NewHTTPError(http.StatusNotFound, "There is no such person.")
	}
	return id, nil
}

func (s *Server) setDisabled(c echo.Context, disabled bool) error {
	id, err := userIDParam(c)
	if err != nil {
		return err
	}
	if disabled && id == currentUser(c).ID {
		return echo.NewHTTPError(http.StatusUnprocessableEntity, "You cannot disable your own account.")
	}
	if err := s.store.SetDisabled(c.Request().Context(), currentUser(c).ID, id, disabled); err != nil {
		return err
	}
	return c.Redirect(http.StatusSeeOther, "/users")
}

func (s *Server) handleDisableUser(c echo.Context) error { return s.setDisabled(c, true) }
func (s *Server) handleEnableUser(c echo.Context) error  { return s.setDisabled(c, false) }

func (s *Server) handleResetPassword(c echo.Context) error {
	id, err := userIDParam(c)
	if err != nil {
		return err
	}
	err = s.store.SetPassword(c.Request().Context(), currentUser(c).ID, id, c.FormValue("password"))
	if ve := asValidation(err); ve != nil {
		return s.usersPage(c, http.StatusUnprocessableEntity, views.UserForm{Errors: ve, PasswordFor: id})
	}
	if err != nil {
		return err
	}
	return c.Redirect(http.StatusSeeOther, "/users?done=password+changed")
}
