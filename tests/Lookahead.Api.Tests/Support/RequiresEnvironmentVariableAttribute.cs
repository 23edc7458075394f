using Xunit;
using Xunit.Abstractions;
using Xunit.Sdk;

namespace Lookahead.Api.Tests.Support;

/// <summary>Marks a test class whose <see cref="StoreFactAttribute"/> tests need an environment variable; without it they are skipped, saying why.</summary>
[AttributeUsage(AttributeTargets.Class)]
public sealed class RequiresEnvironmentVariableAttribute(string name, string purpose) : Attribute
{
    public string Name { get; } = name;

    public string Purpose { get; } = purpose;
}

/// <summary>A fact that may be inherited from a contract base class and skipped per derived class.</summary>
[XunitTestCaseDiscoverer("Lookahead.Api.Tests.Support.StoreFactDiscoverer", "Lookahead.Api.Tests")]
[AttributeUsage(AttributeTargets.Method)]
public sealed class StoreFactAttribute : FactAttribute;

public sealed class StoreFactDiscoverer(IMessageSink diagnosticMessageSink) : IXunitTestCaseDiscoverer
{
    public IEnumerable<IXunitTestCase> Discover(ITestFrameworkDiscoveryOptions discoveryOptions, ITestMethod testMethod, IAttributeInfo factAttribute)
    {
        var requirement = testMethod.TestClass.Class.GetCustomAttributes(typeof(RequiresEnvironmentVariableAttribute)).FirstOrDefault();
        if (requirement is not null)
        {
            var arguments = requirement.GetConstructorArguments().ToArray();
            string name = (string)arguments[0];
            if (string.IsNullOrWhiteSpace(Environment.GetEnvironmentVariable(name)))
            {
                string reason = $"{name} is not set: {(string)arguments[1]}";
                return [new XunitSkippedDataRowTestCase(diagnosticMessageSink, discoveryOptions.MethodDisplayOrDefault(), discoveryOptions.MethodDisplayOptionsOrDefault(), testMethod, reason)];
            }
        }

        return [new XunitTestCase(diagnosticMessageSink, discoveryOptions.MethodDisplayOrDefault(), discoveryOptions.MethodDisplayOptionsOrDefault(), testMethod)];
    }
}
