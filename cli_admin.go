package main

import (
	"bufio"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"strings"
	"text/tabwriter"

	"aloft/records"
)

// openExisting opens a database that must already exist (commands that read
// must not create an empty one by a typo).
func openExisting(ctx context.Context, path string) (*records.Store, error) {
	if path == "" {
		return nil, errors.New("--db FILE is required")
	}
	if _, err := os.Stat(path); err != nil {
		return nil, fmt.Errorf("no database at %s", path)
	}
	return records.Open(ctx, path, records.Options{})
}

type patientJSON struct {
	CaseNumber string  `json:"case_number"`
	Species    string  `json:"species"`
	Status     string  `json:"status"`
	Admitted   string  `json:"admitted"`
	Disposed   *string `json:"disposed"`
}

func cmdPatients(ctx context.Context, args []string, cio cmdIO) int {
	fs := newFlags("patients", "patients --db FILE [--json] [--status in-care|released|…] [--query TEXT]", cio)
	dbPath := fs.String("db", "", "database file")
	asJSON := fs.Bool("json", false, "print a JSON array")
	status := fs.String("status", "", "only patients with this status")
	query := fs.String("query", "", "only patients whose case number, species or reason contains this")
	if code, ok := parseFlags(fs, args, cio); !ok {
		return code
	}
	if *dbPath == "" {
		return usageErr(cio, "patients", "--db FILE is required")
	}
	store, err := openExisting(ctx, *dbPath)
	if err != nil {
		return failErr(cio, "patients", err)
	}
	defer store.Close()
	list, err := store.Patients(ctx, records.PatientFilter{Status: *status, Query: *query, Limit: 1 << 30})
	if err != nil {
		return failErr(cio, "patients", err)
	}
	out := make([]patientJSON, 0, len(list))
	for _, p := range list {
		pj := patientJSON{CaseNumber: p.CaseNumber, Species: p.SpeciesScientific, Status: string(p.Status),
			Admitted: p.AdmittedAt.UTC().Format(records.DateLayout)}
		if !p.InCare() && p.StatusDate != "" {
			d := p.StatusDate
			pj.Disposed = &d
		}
		out = append(out, pj)
	}
	if *asJSON {
		enc := json.NewEncoder(cio.Stdout)
		enc.SetIndent("", "  ")
		if err := enc.Encode(out); err != nil {
			return failErr(cio, "patients", err)
		}
		return exitOK
	}
	tw := tabwriter.NewWriter(cio.Stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "CASE\tSPECIES\tSTATUS\tADMITTED\tDISPOSED")
	for i, p := range out {
		d := ""
		if p.Disposed != nil {
			d = *p.Disposed
		}
		fmt.Fprintf(tw, "%s\t%s (%s)\t%s\t%s\t%s\n", p.CaseNumber, list[i].SpeciesCommon, p.Species, p.Status, p.Admitted, d)
	}
	tw.Flush()
	return exitOK
}

func cmdUser(ctx context.Context, args []string, cio cmdIO) int {
	if len(args) == 0 || args[0] == "-h" || args[0] == "--help" {
		fmt.Fprintln(cio.Stderr, "usage: aloft user add|passwd|disable|enable|list --db FILE [flags]  (each takes --help)")
		if len(args) == 0 {
			return exitUsage
		}
		return exitOK
	}
	sub, rest := args[0], args[1:]
	fs := newFlags("user "+sub, "user "+sub+" --db FILE --username NAME [--name \"Full Name\"] [--roles staff,vet] [--password-stdin]", cio)
	dbPath := fs.String("db", "", "database file")
	username := fs.String("username", "", "the account's username")
	name := fs.String("name", "", "the person's full name (add)")
	roles := fs.String("roles", "staff", "comma-separated roles: staff, rehabilitator, vet, admin (add)")
	pwStdin := fs.Bool("password-stdin", false, "read the password from the first line of standard input (add, passwd); else ALOFT_PASSWORD")
	if code, ok := parseFlags(fs, rest, cio); !ok {
		return code
	}
	if *dbPath == "" {
		return usageErr(cio, "user", "--db FILE is required")
	}
	needName := sub != "list"
	if needName && *username == "" {
		return usageErr(cio, "user "+sub, "--username is required")
	}
	switch sub {
	case "add", "passwd", "disable", "enable", "list":
	default:
		return usageErr(cio, "user", "unknown subcommand %q (add, passwd, disable, enable, list)", sub)
	}
	store, err := openExisting(ctx, *dbPath)
	if err != nil {
		return failErr(cio, "user", err)
	}
	defer store.Close()
	password := func() (string, error) {
		if *pwStdin {
			line, err := bufio.NewReader(os.Stdin).ReadString('\n')
			if err != nil && line == "" {
				return "", errors.New("no password on standard input")
			}
			return strings.TrimRight(line, "\r\n"), nil
		}
		if p := cio.Getenv("ALOFT_PASSWORD"); p != "" {
			return p, nil
		}
		return "", errors.New("give the password with --password-stdin or ALOFT_PASSWORD")
	}
	switch sub {
	case "list":
		users, err := store.Users(ctx)
		if err != nil {
			return failErr(cio, "user list", err)
		}
		tw := tabwriter.NewWriter(cio.Stdout, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "USERNAME\tNAME\tROLES\tSTATE")
		for _, u := range users {
			state := "active"
			if u.Disabled {
				state = "disabled"
			}
			fmt.Fprintf(tw, "%s\t%s\t%v\t%s\n", u.Username, u.DisplayName, u.Roles, state)
		}
		tw.Flush()
	case "add":
		pw, err := password()
		if err != nil {
			return usageErr(cio, "user add", "%v", err)
		}
		var rs []records.Role
		for _, r := range strings.Split(*roles, ",") {
			if r = strings.TrimSpace(r); r != "" {
				rs = append(rs, records.Role(r))
			}
		}
		if *name == "" {
			*name = *username
		}
		if _, err := store.AddUser(ctx, 0, records.NewUser{Username: *username, DisplayName: *name, Password: pw, Roles: rs}); err != nil {
			return failErr(cio, "user add", err)
		}
		fmt.Fprintf(cio.Stdout, "added %s %v\n", *username, rs)
	default:
		u, err := store.UserByName(ctx, *username)
		if err != nil {
			return failErr(cio, "user "+sub, fmt.Errorf("no user %q", *username))
		}
		switch sub {
		case "passwd":
			pw, err := password()
			if err != nil {
				return usageErr(cio, "user passwd", "%v", err)
			}
			err = store.SetPassword(ctx, 0, u.ID, pw)
			if err != nil {
				return failErr(cio, "user passwd", err)
			}
			fmt.Fprintf(cio.Stdout, "password of %s changed; their sessions were ended\n", u.Username)
		case "disable", "enable":
			if err := store.SetDisabled(ctx, 0, u.ID, sub == "disable"); err != nil {
				return failErr(cio, "user "+sub, err)
			}
			fmt.Fprintf(cio.Stdout, "%s %sd\n", u.Username, sub)
		}
	}
	return exitOK
}

func cmdBackup(ctx context.Context, args []string, cio cmdIO) int {
	fs := newFlags("backup", "backup --db FILE --to FILE", cio)
	dbPath := fs.String("db", "", "live database file (the server may keep running)")
	to := fs.String("to", "", "backup file to write (must not exist)")
	if code, ok := parseFlags(fs, args, cio); !ok {
		return code
	}
	if *dbPath == "" || *to == "" {
		return usageErr(cio, "backup", "--db and --to are required")
	}
	store, err := openExisting(ctx, *dbPath)
	if err != nil {
		return failErr(cio, "backup", err)
	}
	defer store.Close()
	if err := store.Backup(ctx, *to); err != nil {
		return failErr(cio, "backup", err)
	}
	if err := records.CheckIntegrity(ctx, *to); err != nil {
		return failErr(cio, "backup", err)
	}
	fmt.Fprintf(cio.Stdout, "backup written to %s (integrity check ok)\n", *to)
	return exitOK
}

func cmdRestore(ctx context.Context, args []string, cio cmdIO) int {
	fs := newFlags("restore", "restore --from BACKUP --db FILE", cio)
	from := fs.String("from", "", "backup file to restore")
	dbPath := fs.String("db", "", "database file to replace (the server must be stopped)")
	if code, ok := parseFlags(fs, args, cio); !ok {
		return code
	}
	if *from == "" || *dbPath == "" {
		return usageErr(cio, "restore", "--from and --db are required")
	}
	if err := records.Restore(ctx, *from, *dbPath); err != nil {
		return failErr(cio, "restore", err)
	}
	fmt.Fprintf(cio.Stdout, "restored %s from %s (integrity check ok)\n", *dbPath, *from)
	return exitOK
}
