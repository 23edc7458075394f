namespace Lookahead.Api.Tests.Support;

/// <summary>Paths in the repository, found from the test assembly's folder.</summary>
public static class Repository
{
    public static string Root { get; } = FindRoot();

    /// <summary>Release or Debug, whichever this test run was built as.</summary>
    public static string Configuration { get; } = new DirectoryInfo(AppContext.BaseDirectory.TrimEnd(Path.DirectorySeparatorChar)).Parent!.Name;

    public static string ApiAssembly => Path.Combine(Root, "src", "Lookahead.Api", "bin", Configuration, "net10.0", "Lookahead.Api.dll");

    private static string FindRoot()
    {
        for (var folder = new DirectoryInfo(AppContext.BaseDirectory); folder is not null; folder = folder.Parent)
        {
            if (File.Exists(Path.Combine(folder.FullName, "Service.sln")))
            {
                return folder.FullName;
            }
        }

        throw new DirectoryNotFoundException("Service.sln not found above " + AppContext.BaseDirectory);
    }
}
