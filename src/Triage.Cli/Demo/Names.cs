namespace Triage.Cli.Demo;

/// <summary>
/// Invented claimant names: ordinary given names with surnames built from made-up halves, so every
/// full name is plausible on a screen yet belongs to nobody.
/// </summary>
internal static class Names
{
    private static readonly string[] Given =
    [
        "Alma", "Bram", "Cora", "Dario", "Edda", "Fintan", "Greta", "Hollis", "Ines", "Joren",
        "Kasia", "Lorcan", "Mira", "Nevin", "Oona", "Piet", "Quinn", "Rosalind", "Sten", "Tamsin",
        "Ulla", "Vico", "Wenna", "Xavi", "Yselde", "Zoltan", "Anouk", "Basil", "Cerys", "Declan",
        "Elin", "Florin", "Gwen", "Hugo", "Ilse", "Jarek", "Kerensa", "Leif", "Maelle", "Nico",
    ];

    private static readonly string[] SurnameStart =
    [
        "Quill", "Marrow", "Thistle", "Fern", "Copper", "Amber", "Brindle", "Cobble", "Drizzle",
        "Ember", "Flint", "Gorse", "Heather", "Ivy", "Juniper", "Kettle", "Lantern", "Moss",
        "Nettle", "Otter", "Pebble", "Rush", "Sorrel", "Tansy", "Umber", "Vetch", "Wicker", "Yarrow",
    ];

    private static readonly string[] SurnameEnd =
    [
        "whistle", "lode", "vane", "brook", "combe", "thwaite", "hollow", "mantle", "shaw",
        "wick", "garth", "hythe", "stile", "fold", "mere", "tor",
    ];

    public static string Claimant(DemoRandom random) =>
        $"{random.Pick(Given)} {random.Pick(SurnameStart)}{random.Pick(SurnameEnd)}";
}
