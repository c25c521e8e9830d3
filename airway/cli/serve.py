"""``airway serve``: the clinic and the ward in a web browser."""

from pathlib import Path
from typing import Annotated

import typer

from .app import app
from .help import GroupedCommand


@app.command(cls=GroupedCommand)
def serve(
    host: Annotated[
        str,
        typer.Option(
            metavar="ADDRESS", help="Address to listen on (loopback unless a token file)."
        ),
    ] = "127.0.0.1",
    port: Annotated[
        int, typer.Option(metavar="PORT", min=1, max=65535, help="Port to listen on.")
    ] = 8750,
    plans: Annotated[
        Path | None,
        typer.Option(metavar="DIR", help="Folder for saved plans; the board reads it."),
    ] = None,
    token_file: Annotated[
        Path | None,
        typer.Option(metavar="FILE", help="A long random access token, needed off loopback."),
    ] = None,
    no_browser: Annotated[
        bool, typer.Option("--no-browser", help="Do not open a browser.")
    ] = False,
) -> None:
    """The clinic and the ward in a web browser, on this machine.

    Prints one line with the address (it carries this start's access token); stop
    with Ctrl-C.
    """
    from ..web.security import UnsafeBindError, settings_for

    if plans is not None and not plans.is_dir():
        typer.echo(f"airway: --plans {plans}: not a folder", err=True)
        raise typer.Exit(2)
    try:
        settings = settings_for(host, port, plans, token_file)
    except (UnsafeBindError, OSError) as exc:
        typer.echo(f"airway: {exc}", err=True)
        raise typer.Exit(2) from None
    _run(settings, open_browser=not no_browser)


def _run(settings: object, open_browser: bool) -> None:
    import webbrowser

    import uvicorn

    from ..web.app import create_app
    from ..web.security import Settings

    assert isinstance(settings, Settings)
    config = uvicorn.Config(
        create_app(settings),
        host=settings.host,
        port=settings.port,
        access_log=False,  # request lines carry the token and what was looked at
        log_level="warning",
        lifespan="off",
    )
    typer.echo(f"airway: serving on {settings.url()}")
    if open_browser:
        webbrowser.open(settings.url())
    uvicorn.Server(config).run()  # returns on Ctrl-C or SIGTERM
